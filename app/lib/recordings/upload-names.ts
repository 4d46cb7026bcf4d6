/** The name of an uploaded file: which names are taken, and the title a recording gets from one. Pure, safe in the browser. */

/** An upload's file name must be a plain name: no path separators, no control characters. */
export function fileNameProblem(name: string): string | null {
  if (!name?.trim()) return "The file has no name.";
  if (name.length > 255) return "The file name is longer than 255 characters.";
  if (/[/\\]/.test(name)) return "The file name contains a path separator (/ or \\); rename the file and try again.";
  if (/[\u0000-\u001f\u007f]/.test(name)) return "The file name contains control characters; rename the file and try again.";
  if (name === "." || name === "..") return "That is not a file name.";
  return null;
}

/** "Bench test 2 - moly.mov" → "Bench test 2 - moly" */
export function titleFromFileName(name: string): string {
  return (
    name
      .replace(/\.[A-Za-z0-9]{1,5}$/, "")
      .replace(/[_]+/g, " ")
      .trim()
      .slice(0, 200) || "Untitled recording"
  );
}

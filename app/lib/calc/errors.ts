/** Throwing validation errors that look exactly like the ones zod's own parse throws. */
import { z } from "zod";

/** One validation problem: where (path) and why (message). */
export interface CalcIssue {
  path: (string | number)[];
  message: string;
}

const reporter = z.array(z.object({ path: z.array(z.union([z.string(), z.number()])), message: z.string() }));

/**
 * Throws a ZodError (the same class `schema.parse` throws) carrying the given issues.
 * Used for checks that need the module's own tables (e.g. an unknown thread).
 */
export function failWithIssues(issues: CalcIssue[]): never {
  z.custom<CalcIssue[]>()
    .superRefine((list, ctx) => {
      for (const issue of list) ctx.addIssue({ code: "custom", message: issue.message, path: issue.path });
    })
    .parse(reporter.parse(issues));
  // superRefine always adds at least one issue, so parse has thrown; this is for the type checker.
  throw new Error(issues.map((i) => i.message).join("; "));
}

/** Throws a ZodError with a single issue at `path`. */
export function failWith(path: (string | number)[], message: string): never {
  return failWithIssues([{ path, message }]);
}

/** Checks a sanitized document's structure against the TipTap/ProseMirror schema of our extensions. */
import { getSchema } from "@tiptap/core";
import { Node as PMNode } from "@tiptap/pm/model";
import { baseExtensions } from "./extensions";
import type { JSONNode } from "./document";

let schema: ReturnType<typeof getSchema> | undefined;

export function structureProblem(doc: JSONNode): string | null {
  schema ??= getSchema(baseExtensions);
  try {
    PMNode.fromJSON(schema, doc).check();
    return null;
  } catch (err) {
    return `the document's structure is not valid: ${(err as Error).message}`;
  }
}

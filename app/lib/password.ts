import { z } from "zod";

/** The one password rule, shared by the invitation and reset forms. */
export const newPasswordSchema = z.string().min(10, "Use at least 10 characters.").max(200, "Use at most 200 characters.");

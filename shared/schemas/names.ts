import { z } from "zod";

/**
 * Names that end up in remote paths or batch scripts. Only a conservative character set is accepted, so
 * nothing a user types can change the meaning of a path or a shell line.
 */
export const safeFileNameSchema = z
  .string()
  .min(1)
  .max(100)
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, {
    error: "Use letters, digits, dot, dash and underscore only, starting with a letter or digit (no paths).",
  })
  .refine((name) => name !== "." && name !== ".." && !name.includes(".."), {
    error: "'..' is not allowed in a file name.",
  });

export const identifierSchema = z
  .string()
  .min(1)
  .max(64)
  .regex(/^[a-z][a-z0-9-]*$/, { error: "Use lowercase letters, digits and dashes, starting with a letter." });

/**
 * A folder on a cluster host: absolute, or relative to the account's home folder (as both SSH commands
 * and SFTP resolve it), without `..`, quotes, spaces or shell metacharacters.
 */
export const remoteDirSchema = z
  .string()
  .min(1)
  .max(400)
  .regex(/^[A-Za-z0-9._/-]+$/, { error: "Give a folder using letters, digits, '.', '_', '-' and '/'." })
  .refine((p) => !p.split("/").includes(".."), { error: "'..' is not allowed in the folder." })
  .refine((p) => !p.startsWith("-"), { error: "The folder must not start with '-'." })
  .transform((p) => (p.length > 1 ? p.replace(/\/+$/, "") : p));

/**
 * Escaping of parameter values, per file format.
 *
 * Parameter values come from whoever submits a run, so every string is escaped for the file's format
 * before the template sees it (autoescape stays off; each escaped leaf is marked safe):
 *   shell    → POSIX single-quoted word ('it'\''s')
 *   json     → JSON string literal
 *   namelist → Fortran character constant with doubled quotes ('it''s'); booleans print .true./.false.
 *   text     → as given, but control characters (newlines included) are refused
 * Numbers and booleans stay native so conditions and arithmetic work; they are printed per format.
 */
import type { TemplateFormat } from "../../../shared/schemas/codes";
import { type Safe, SafeString } from "./nunjucks-internals";

// biome-ignore lint/suspicious/noControlCharactersInRegex: matching control characters is the point.
const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;
export const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export type Escaped = Safe | number | boolean | Escaped[] | { [key: string]: Escaped };

export function quoteString(value: string, format: TemplateFormat, where: string): string {
  if (LONE_SURROGATE.test(value)) {
    throw new Error(`${where} contains a lone UTF-16 surrogate, which cannot be written as UTF-8`);
  }
  switch (format) {
    case "shell":
      if (value.includes("\0"))
        throw new Error(`${where} contains a NUL character, which a shell cannot pass`);
      return `'${value.replaceAll("'", "'\\''")}'`;
    case "json":
      return JSON.stringify(value);
    case "namelist":
      if (CONTROL_CHARACTERS.test(value)) {
        throw new Error(
          `${where} contains a control character (such as a newline); namelist strings are one line`,
        );
      }
      return `'${value.replaceAll("'", "''")}'`;
    case "text":
      if (CONTROL_CHARACTERS.test(value)) {
        throw new Error(`${where} contains a control character (such as a newline), which text files refuse`);
      }
      return value;
  }
}

export function escapeValue(value: unknown, format: TemplateFormat, where: string): Escaped {
  if (typeof value === "string") return new SafeString(quoteString(value, format, where));
  if (typeof value === "number") {
    if (!Number.isFinite(value)) throw new Error(`${where} is not a finite number`);
    return value;
  }
  if (typeof value === "boolean") return value;
  if (value === null) {
    if (format === "namelist") throw new Error(`${where} is null, which a namelist cannot express`);
    return new SafeString(format === "json" ? "null" : format === "shell" ? "''" : "");
  }
  if (Array.isArray(value)) return value.map((item, i) => escapeValue(item, format, `${where}[${i}]`));
  if (typeof value === "object") {
    // A null prototype: nothing is inherited, and a key named "__proto__" stays an ordinary key.
    const escaped: { [key: string]: Escaped } = Object.create(null);
    for (const [key, item] of Object.entries(value)) {
      if (key === "__proto__") throw new Error(`${where} has a key named __proto__, which is not allowed`);
      escaped[key] = escapeValue(item, format, `${where}.${key}`);
    }
    return escaped;
  }
  throw new Error(`${where} has a value of type ${typeof value}, which cannot be written to a file`);
}

/**
 * Printing: what `{{ value }}` writes. Template strings print as they are; parameter strings are
 * already escaped (escaping.ts); containers print as the format's list or object notation.
 */
import type { TemplateFormat } from "../../../shared/schemas/codes";
import { quoteString } from "./escaping";
import { SafeString } from "./nunjucks-internals";

export const isPlainObject = (value: object): boolean => {
  const proto = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
};

function printScalar(value: unknown, format: TemplateFormat, inContainer: boolean): string {
  if (value instanceof SafeString) return value.toString();
  if (typeof value === "string") return inContainer ? quoteString(value, format, "a value") : value;
  if (typeof value === "boolean")
    return format === "namelist" ? (value ? ".true." : ".false.") : String(value);
  if (typeof value === "number") {
    if (format === "json" && !Number.isFinite(value)) throw new Error(`${value} cannot be written as JSON`);
    return String(value);
  }
  if (value === null || value === undefined) return format === "json" && inContainer ? "null" : "";
  if (typeof value === "function") throw new Error("a function cannot be printed; call it");
  if (typeof value === "object") return printValue(value, format);
  return String(value);
}

export function printValue(value: unknown, format: TemplateFormat): string {
  if (Array.isArray(value)) {
    const items = value.map((item) => printScalar(item, format, true));
    if (format === "json") return `[${items.join(", ")}]`;
    return items.join(format === "shell" ? " " : ", ");
  }
  if (typeof value === "object" && value !== null && !(value instanceof SafeString)) {
    if (!isPlainObject(value)) throw new Error("this value cannot be printed");
    if (format !== "json") {
      throw new Error(`an object cannot be printed into a ${format} file; print its fields one by one`);
    }
    const entries = Object.entries(value).map(
      ([key, item]) => `${JSON.stringify(key)}: ${printScalar(item, format, true)}`,
    );
    return `{${entries.join(", ")}}`;
  }
  return printScalar(value, format, false);
}

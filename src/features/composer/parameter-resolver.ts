/**
 * Checks a stage's parameters in the browser against its code's JSON Schema, as the page is typed.
 *
 * Sigmaflow's pages run under a Content-Security-Policy without `unsafe-eval`, and Ajv (the server's
 * validator, server/execution/parameters.ts) compiles schemas into functions with `new Function`, which
 * that policy forbids; so does react-hook-form's Ajv resolver. The browser therefore reads the schema
 * directly for the keywords parameter schemas use — type, enum, const, numeric bounds, multipleOf,
 * lengths, pattern (on RE2, as the server, so a member's pattern cannot stall the page), items,
 * minItems/maxItems, uniqueItems, properties, required, additionalProperties — with the server's wording.
 * Anything else (combinators, references, formats) is left to the server. The server's answer is what
 * counts: the composer submits only a spec the preview endpoint (the same checks as submission) has just
 * accepted, so a value the form lets through is one the server accepts.
 */

import { RE2JS } from "re2js";
import type { FieldError } from "react-hook-form";

/** Longest a member's pattern may be (the server's MAX_PATTERN_LENGTH); longer ones are left to it. */
const MAX_PATTERN_LENGTH = 500;
/** Deepest nesting looked into (the server's MAX_JSON_DEPTH). */
const MAX_DEPTH = 32;
const PATTERN_CACHE_LIMIT = 200;

type Schema = Record<string, unknown>;
type Problem = { path: string[]; message: string };

const isRecord = (value: unknown): value is Schema =>
  typeof value === "object" && value !== null && !Array.isArray(value);

const patterns = new Map<string, RE2JS | null>();
function compiled(pattern: string): RE2JS | null {
  if (patterns.has(pattern)) return patterns.get(pattern) ?? null;
  let re: RE2JS | null = null;
  if (pattern.length <= MAX_PATTERN_LENGTH) {
    try {
      re = RE2JS.compile(pattern);
    } catch {
      re = null;
    }
  }
  if (patterns.size >= PATTERN_CACHE_LIMIT) patterns.clear();
  patterns.set(pattern, re);
  return re;
}

function typeMatches(type: string, value: unknown): boolean {
  switch (type) {
    case "string":
      return typeof value === "string";
    case "number":
      return typeof value === "number" && Number.isFinite(value);
    case "integer":
      return typeof value === "number" && Number.isInteger(value);
    case "boolean":
      return typeof value === "boolean";
    case "null":
      return value === null;
    case "array":
      return Array.isArray(value);
    case "object":
      return isRecord(value);
    default:
      return true;
  }
}

/** JSON equality of two parsed JSON values (objects compared key by key, in any order). */
function jsonEqual(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (Array.isArray(a) && Array.isArray(b))
    return a.length === b.length && a.every((item, i) => jsonEqual(item, b[i]));
  if (isRecord(a) && isRecord(b)) {
    const keys = Object.keys(a);
    return (
      keys.length === Object.keys(b).length && keys.every((key) => key in b && jsonEqual(a[key], b[key]))
    );
  }
  return false;
}

const SCALAR_TYPES = new Set(["string", "number", "integer", "boolean", "null"]);

/**
 * The pair of identical items Ajv names, as "items ## A and B". Ajv has two searches: for items typed as
 * scalars, a scan from the end remembering where each value was last seen (A the later index, B the
 * earlier); otherwise, pairwise from the end (A the earlier index, B the later).
 */
function duplicatePair(items: unknown[], itemSchema: unknown): [number, number] | null {
  const itemType = isRecord(itemSchema) ? itemSchema.type : undefined;
  const itemTypes = Array.isArray(itemType) ? itemType : itemType === undefined ? [] : [itemType];
  if (itemTypes.length > 0 && itemTypes.every((type) => SCALAR_TYPES.has(String(type)))) {
    const seen = new Map<unknown, number>();
    for (let i = items.length - 1; i >= 0; i--) {
      const later = seen.get(items[i]);
      if (later !== undefined) return [later, i];
      seen.set(items[i], i);
    }
    return null;
  }
  for (let i = items.length - 1; i > 0; i--) {
    for (let j = i - 1; j >= 0; j--) if (jsonEqual(items[i], items[j])) return [j, i];
  }
  return null;
}

function check(schema: unknown, value: unknown, path: string[], problems: Problem[]): void {
  if (!isRecord(schema) || path.length > MAX_DEPTH) return;
  const say = (message: string, at: string[] = path) => problems.push({ path: at, message });
  const types = Array.isArray(schema.type)
    ? schema.type.map(String)
    : typeof schema.type === "string"
      ? [schema.type]
      : [];
  if (types.length > 0 && !types.some((type) => typeMatches(type, value))) {
    say(`must be ${types.join(",")}`);
    return;
  }
  if (Array.isArray(schema.enum) && !schema.enum.some((option) => jsonEqual(option, value))) {
    say(`must be one of ${schema.enum.map((option) => JSON.stringify(option)).join(", ")}`);
  }
  if ("const" in schema && !jsonEqual(schema.const, value)) say("must be equal to constant");
  if (typeof value === "number") {
    if (typeof schema.minimum === "number" && value < schema.minimum) say(`must be >= ${schema.minimum}`);
    if (typeof schema.maximum === "number" && value > schema.maximum) say(`must be <= ${schema.maximum}`);
    if (typeof schema.exclusiveMinimum === "number" && value <= schema.exclusiveMinimum)
      say(`must be > ${schema.exclusiveMinimum}`);
    if (typeof schema.exclusiveMaximum === "number" && value >= schema.exclusiveMaximum)
      say(`must be < ${schema.exclusiveMaximum}`);
    if (typeof schema.multipleOf === "number" && schema.multipleOf > 0) {
      const quotient = value / schema.multipleOf;
      if (Math.abs(quotient - Math.round(quotient)) > 1e-9) say(`must be multiple of ${schema.multipleOf}`);
    }
  }
  if (typeof value === "string") {
    // Lengths count code points, as Ajv does (its default unicode option).
    const length = [...value].length;
    if (typeof schema.minLength === "number" && length < schema.minLength)
      say(`must NOT have fewer than ${schema.minLength} characters`);
    if (typeof schema.maxLength === "number" && length > schema.maxLength)
      say(`must NOT have more than ${schema.maxLength} characters`);
    if (typeof schema.pattern === "string") {
      const re = compiled(schema.pattern);
      if (re && !re.test(value)) say(`must match pattern "${schema.pattern}"`);
    }
  }
  if (Array.isArray(value)) {
    if (typeof schema.minItems === "number" && value.length < schema.minItems)
      say(`must NOT have fewer than ${schema.minItems} items`);
    if (typeof schema.maxItems === "number" && value.length > schema.maxItems)
      say(`must NOT have more than ${schema.maxItems} items`);
    if (schema.uniqueItems === true) {
      const pair = duplicatePair(value, schema.items);
      if (pair) say(`must NOT have duplicate items (items ## ${pair[0]} and ${pair[1]} are identical)`);
    }
    if (isRecord(schema.items)) {
      for (const [i, item] of value.entries()) check(schema.items, item, [...path, String(i)], problems);
    }
  }
  if (isRecord(value)) {
    const properties = isRecord(schema.properties) ? schema.properties : {};
    for (const name of Array.isArray(schema.required) ? schema.required.map(String) : []) {
      if (!(name in value)) say("is required", [...path, name]);
    }
    for (const [name, item] of Object.entries(value)) {
      if (name in properties) check(properties[name], item, [...path, name], problems);
      else if (schema.additionalProperties === false && !isRecord(schema.patternProperties))
        say("is not a parameter of this code", [...path, name]);
      else if (isRecord(schema.additionalProperties) && !isRecord(schema.patternProperties))
        check(schema.additionalProperties, item, [...path, name], problems);
    }
  }
}

export type ParameterErrors = Record<string, FieldError>;

/**
 * Checks one stage's parameters against its code's schema: the first problem per top-level parameter (a
 * problem inside an array or object parameter is shown at that parameter, saying where inside).
 */
export function checkParameters(schema: Schema, parameters: Record<string, unknown>): ParameterErrors {
  const problems: Problem[] = [];
  check(schema, parameters, [], problems);
  const errors: ParameterErrors = {};
  for (const { path, message } of problems) {
    const [name = "", ...inner] = path;
    errors[name] ??= {
      type: "schema",
      message: inner.length > 0 ? `${inner.join(".")}: ${message}` : message,
    };
  }
  return errors;
}

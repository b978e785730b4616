/**
 * A code declares its parameters as a JSON Schema (draft 2020-12, as understood by Ajv); run parameters
 * are validated against it. Compiled validators are cached by a hash of the canonical schema text, so
 * the same definition is compiled once per process however many runs use it.
 *
 * The schema's `pattern` and `patternProperties` are written by group members, so Ajv compiles them
 * with RE2 (user-patterns.ts) rather than JavaScript's backtracking RegExp, and one validation may spend
 * at most VALIDATION_TIME_LIMIT_MS on them. Schemas and parameters nesting deeper than MAX_JSON_DEPTH
 * are refused before anything recursive walks them.
 */
import { createHash } from "node:crypto";
import { Ajv2020, type ErrorObject, type Options, type ValidateFunction } from "ajv/dist/2020.js";
import addFormatsModule from "ajv-formats";
import { canonicalJson } from "../../shared/canonical-json";
import { findExcessDepth } from "../../shared/json-depth";
import type { CodeDefinition } from "../../shared/schemas/codes";
import { compileUserPattern, PatternError } from "./user-patterns";

// ajv-formats is CommonJS with `exports.default`; under ESM interop the function may sit one level down.
const addFormats = ((addFormatsModule as unknown as { default?: unknown }).default ??
  addFormatsModule) as typeof addFormatsModule;

/** Deepest nesting of objects and arrays in a parameters schema or in a run's parameters. */
export const MAX_JSON_DEPTH = 32;
/** Longest one validation may spend matching the schema's patterns. */
export const VALIDATION_TIME_LIMIT_MS = 500;

export type ParameterProblem = { path: string; message: string };
export type ParameterCheck =
  | { valid: true; parameters: Record<string, unknown> }
  | { valid: false; errors: ParameterProblem[] };

export class ParameterSchemaError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ParameterSchemaError";
  }
}

const CACHE_LIMIT = 500;
const validators = new Map<string, ValidateFunction>();

/** Hash of the canonical schema text, so two spellings of one schema share a cache entry. */
export function schemaHash(schema: unknown): string {
  return createHash("sha256").update(canonicalJson(schema)).digest("hex");
}

class ValidationTimeout extends Error {}

/** Set for the duration of one (synchronous) validation; every pattern test checks it. */
let validationDeadline = Number.POSITIVE_INFINITY;

/**
 * Ajv's `code.regExp` engine over RE2. Ajv calls it with a pattern and its flags ("u") when it compiles a
 * schema, keys its cache by the result's `toString()` and calls only `test` while validating. `code`
 * would name the engine in standalone code, which Sigmaflow never generates.
 */
const re2Engine: NonNullable<NonNullable<Options["code"]>["regExp"]> = Object.assign(
  (pattern: string, flags: string) => {
    const compiled = compileUserPattern(pattern, flags);
    return {
      test(text: string): boolean {
        if (Date.now() > validationDeadline) throw new ValidationTimeout();
        return compiled.test(text);
      },
      toString: () => compiled.toString(),
    };
  },
  { code: "compileUserPattern" },
);

function newAjv(): Ajv2020 {
  // One Ajv per schema: two codes may use the same $id for different schemas without colliding.
  // Unknown keywords are refused (a typo such as "minimun" would otherwise validate nothing); "unit" is
  // accepted as an annotation so a schema can say what a number is measured in.
  const ajv = new Ajv2020({
    allErrors: true,
    useDefaults: true,
    strict: true,
    strictTypes: false,
    strictTuples: false,
    strictRequired: false,
    // Strict mode would test each patternProperties pattern against the property names with RegExp.
    allowMatchingProperties: true,
    code: { regExp: re2Engine },
    logger: false,
  });
  addFormats(ajv);
  ajv.addKeyword({ keyword: "unit", schemaType: "string" });
  return ajv;
}

/** Compiles a parameter schema (cached); an unusable one throws with Ajv's explanation. */
export function compileParameterSchema(schema: Record<string, unknown>): ValidateFunction {
  const excess = findExcessDepth(schema, MAX_JSON_DEPTH);
  if (excess) {
    throw new ParameterSchemaError(
      `The parameters schema nests more than ${MAX_JSON_DEPTH} levels deep (at ${excess.path.join(".")}); flatten it.`,
    );
  }
  const key = schemaHash(schema);
  const cached = validators.get(key);
  if (cached) return cached;
  if (schema.type !== "object") {
    throw new ParameterSchemaError(
      'The parameters schema must describe an object: give it "type": "object".',
    );
  }
  let validate: ValidateFunction;
  try {
    validate = newAjv().compile(schema);
  } catch (error) {
    if (error instanceof PatternError) {
      throw new ParameterSchemaError(
        `The parameters schema has a pattern Sigmaflow cannot use, ${JSON.stringify(error.pattern)}: ${error.reason}`,
      );
    }
    throw new ParameterSchemaError(
      `The parameters schema is not valid JSON Schema: ${(error as Error).message}`,
    );
  }
  // An async validator answers with a promise, which reads as "valid", and rejects unobserved later.
  if ((validate as { $async?: boolean }).$async) {
    throw new ParameterSchemaError('The parameters schema cannot be asynchronous: remove "$async".');
  }
  if (validators.size >= CACHE_LIMIT) validators.clear();
  validators.set(key, validate);
  return validate;
}

function pointerToPath(pointer: string): string[] {
  if (!pointer) return [];
  return pointer
    .slice(1)
    .split("/")
    .map((part) => part.replaceAll("~1", "/").replaceAll("~0", "~"));
}

function toProblem(error: ErrorObject): ParameterProblem {
  const path = pointerToPath(error.instancePath);
  const params = error.params as Record<string, unknown>;
  if (error.keyword === "required" && typeof params.missingProperty === "string") {
    path.push(params.missingProperty);
    return { path: path.join("."), message: "is required" };
  }
  if (error.keyword === "additionalProperties" && typeof params.additionalProperty === "string") {
    path.push(params.additionalProperty);
    return { path: path.join("."), message: "is not a parameter of this code" };
  }
  if (error.keyword === "enum" && Array.isArray(params.allowedValues)) {
    return {
      path: path.join("."),
      message: `must be one of ${params.allowedValues.map((v) => JSON.stringify(v)).join(", ")}`,
    };
  }
  return { path: path.join("."), message: error.message ?? "is invalid" };
}

/**
 * Validates run parameters against the code's schema. On success returns a copy with the schema's
 * defaults filled in (the input is never modified).
 */
export function validateParameters(
  definition: Pick<CodeDefinition, "parameters">,
  params: unknown,
): ParameterCheck {
  let validate: ValidateFunction;
  try {
    validate = compileParameterSchema(definition.parameters);
  } catch (error) {
    // A schema stored before a rule tightened: the run is refused with the reason, not a server error.
    if (!(error instanceof ParameterSchemaError)) throw error;
    return { valid: false, errors: [{ path: "", message: `the code cannot be run: ${error.message}` }] };
  }
  const excess = findExcessDepth(params, MAX_JSON_DEPTH);
  if (excess) {
    return {
      valid: false,
      errors: [{ path: excess.path.join("."), message: `is nested more than ${MAX_JSON_DEPTH} levels deep` }],
    };
  }
  const copy = structuredClone(params ?? {});
  let valid: boolean;
  validationDeadline = Date.now() + VALIDATION_TIME_LIMIT_MS;
  try {
    valid = validate(copy) as boolean;
  } catch (error) {
    if (!(error instanceof ValidationTimeout)) throw error;
    const message = `checking the values against the code's patterns took longer than ${VALIDATION_TIME_LIMIT_MS} ms; shorten long values`;
    return { valid: false, errors: [{ path: "", message }] };
  } finally {
    validationDeadline = Number.POSITIVE_INFINITY;
  }
  if (valid) return { valid: true, parameters: copy as Record<string, unknown> };
  const seen = new Set<string>();
  const errors: ParameterProblem[] = [];
  for (const problem of (validate.errors ?? []).map(toProblem)) {
    const key = `${problem.path}\0${problem.message}`;
    if (!seen.has(key)) {
      seen.add(key);
      errors.push(problem);
    }
  }
  return { valid: false, errors };
}

/**
 * A code declares its parameters as a JSON Schema (draft 2020-12, as understood by Ajv); run parameters
 * are validated against it. Compiled validators are cached by a hash of the canonical schema text, so
 * the same definition is compiled once per process however many runs use it.
 */
import { createHash } from "node:crypto";
import { Ajv2020, type ErrorObject, type ValidateFunction } from "ajv/dist/2020.js";
import addFormatsModule from "ajv-formats";
import type { CodeDefinition } from "../../shared/schemas/execution/codes";

// ajv-formats is CommonJS with `exports.default`; under ESM interop the function may sit one level down.
const addFormats = ((addFormatsModule as unknown as { default?: unknown }).default ??
  addFormatsModule) as typeof addFormatsModule;

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

/** JSON with object keys sorted, so two spellings of one schema share a cache entry. */
function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (value && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, item]) => item !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([key, item]) => `${JSON.stringify(key)}:${canonicalJson(item)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}

export function schemaHash(schema: unknown): string {
  return createHash("sha256").update(canonicalJson(schema)).digest("hex");
}

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
    logger: false,
  });
  addFormats(ajv);
  ajv.addKeyword({ keyword: "unit", schemaType: "string" });
  return ajv;
}

/** Compiles a parameter schema (cached); an unusable one throws with Ajv's explanation. */
export function compileParameterSchema(schema: Record<string, unknown>): ValidateFunction {
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
    throw new ParameterSchemaError(
      `The parameters schema is not valid JSON Schema: ${(error as Error).message}`,
    );
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
  const validate = compileParameterSchema(definition.parameters);
  const copy = structuredClone(params ?? {});
  if (validate(copy)) return { valid: true, parameters: copy as Record<string, unknown> };
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

/**
 * Validation of a stage's parameters in the browser with the code's own JSON Schema and the validator
 * the server uses (server/execution/parameters.ts): Ajv's draft 2020-12 class with the same options — all
 * errors, defaults filled in, strict schemas, `unit` accepted as an annotation — and `pattern`s run on RE2
 * (re2js, as on the server), so a member's pattern means the same here and cannot stall the page. Messages
 * are worded as the server words them. A value this form accepts is therefore one the server accepts; the
 * server still checks everything again (the preview shows its answer). A schema the browser cannot
 * compile is left to the server's check.
 *
 * (react-hook-form's own Ajv resolver needs the `ajv-errors` plugin, which Sigmaflow does not ship, and
 * compiles with the draft-07 class; this small resolver keeps the server's class instead.)
 */
import { Ajv2020, type ErrorObject, type ValidateFunction } from "ajv/dist/2020.js";
import addFormatsModule from "ajv-formats";
import { RE2JS } from "re2js";
import type { FieldError } from "react-hook-form";

// ajv-formats is CommonJS with `exports.default`; under ESM interop the function may sit one level down.
const addFormats = ((addFormatsModule as unknown as { default?: unknown }).default ??
  addFormatsModule) as typeof addFormatsModule;

/** Longest a member's pattern may be (the server's MAX_PATTERN_LENGTH). */
const MAX_PATTERN_LENGTH = 500;
const CACHE_LIMIT = 50;

const FLAG_BITS: Record<string, number> = {
  i: RE2JS.CASE_INSENSITIVE,
  m: RE2JS.MULTILINE,
  s: RE2JS.DOTALL,
  u: 0,
};

const re2Engine = Object.assign(
  (pattern: string, flags: string) => {
    if (pattern.length > MAX_PATTERN_LENGTH) throw new Error(`pattern longer than ${MAX_PATTERN_LENGTH}`);
    let bits = 0;
    for (const flag of flags) bits |= FLAG_BITS[flag] ?? 0;
    const re = RE2JS.compile(pattern, bits);
    return { test: (text: string) => re.test(text), toString: () => `/${pattern}/${flags}` };
  },
  { code: "re2Engine" },
);

function newAjv(): Ajv2020 {
  const ajv = new Ajv2020({
    allErrors: true,
    useDefaults: true,
    strict: true,
    strictTypes: false,
    strictTuples: false,
    strictRequired: false,
    allowMatchingProperties: true,
    code: { regExp: re2Engine as never },
    logger: false,
  });
  addFormats(ajv);
  ajv.addKeyword({ keyword: "unit", schemaType: "string" });
  return ajv;
}

const validators = new Map<string, ValidateFunction | null>();

/** The compiled schema (one Ajv per schema, as on the server), or null when it cannot be compiled here. */
function validatorFor(schema: Record<string, unknown>): ValidateFunction | null {
  const key = JSON.stringify(schema);
  if (validators.has(key)) return validators.get(key) ?? null;
  let validate: ValidateFunction | null;
  try {
    validate = newAjv().compile(schema);
    if ((validate as { $async?: boolean }).$async) validate = null;
  } catch {
    validate = null;
  }
  if (validators.size >= CACHE_LIMIT) validators.clear();
  validators.set(key, validate);
  return validate;
}

/** The top-level parameter an error is about, and the server's wording of it. */
function problemOf(error: ErrorObject): { name: string; message: string } {
  const path = error.instancePath
    .split("/")
    .slice(1)
    .map((part) => part.replaceAll("~1", "/").replaceAll("~0", "~"));
  const params = error.params as Record<string, unknown>;
  let message = error.message ?? "is invalid";
  if (error.keyword === "required" && typeof params.missingProperty === "string") {
    path.push(params.missingProperty);
    message = "is required";
  } else if (error.keyword === "additionalProperties" && typeof params.additionalProperty === "string") {
    path.push(params.additionalProperty);
    message = "is not a parameter of this code";
  } else if (error.keyword === "enum" && Array.isArray(params.allowedValues)) {
    message = `must be one of ${params.allowedValues.map((v) => JSON.stringify(v)).join(", ")}`;
  }
  // An error inside an array or object parameter is shown at that parameter, with where inside it.
  const [name = "", ...inner] = path;
  return { name, message: inner.length > 0 ? `${inner.join(".")}: ${message}` : message };
}

export type ParameterErrors = Record<string, FieldError>;

/** Checks one stage's parameters against its code's schema: the first error per top-level parameter. */
export function checkParameters(
  schema: Record<string, unknown>,
  parameters: Record<string, unknown>,
): ParameterErrors {
  const validate = validatorFor(schema);
  if (!validate) return {};
  if (validate(structuredClone(parameters))) return {};
  const errors: ParameterErrors = {};
  for (const problem of (validate.errors ?? []).map(problemOf)) {
    errors[problem.name] ??= { type: "schema", message: problem.message };
  }
  return errors;
}

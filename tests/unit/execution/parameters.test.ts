/**
 * Run parameters against a code's JSON Schema (draft 2020-12, validated by Ajv). Expected verdicts follow
 * the JSON Schema 2020-12 validation vocabulary (json-schema.org/draft/2020-12/json-schema-validation)
 * and RFC 3339 for "date-time".
 */
import { describe, expect, it } from "vitest";
import {
  compileParameterSchema,
  MAX_JSON_DEPTH,
  ParameterSchemaError,
  schemaHash,
  validateParameters,
} from "../../../server/execution/parameters";
import { regExpSourcesRunDuring } from "./native-regexp";

const scattering = {
  type: "object",
  additionalProperties: false,
  required: ["molecule", "energiesEv"],
  properties: {
    molecule: { type: "string", enum: ["h2o", "ch4"] },
    energiesEv: { type: "array", items: { type: "number", exclusiveMinimum: 0, unit: "eV" }, minItems: 1 },
    maxPartialWave: { type: "integer", minimum: 0, default: 4 },
    basis: {
      type: "object",
      properties: { name: { type: "string", minLength: 1 } },
      required: ["name"],
    },
    startedAt: { type: "string", format: "date-time" },
  },
};

describe("validateParameters", () => {
  it("accepts valid parameters and fills defaults into a copy", () => {
    const input = { molecule: "h2o", energiesEv: [0.5, 2] };
    const result = validateParameters({ parameters: scattering }, input);
    expect(result).toEqual({
      valid: true,
      parameters: { molecule: "h2o", energiesEv: [0.5, 2], maxPartialWave: 4 },
    });
    expect(input).toEqual({ molecule: "h2o", energiesEv: [0.5, 2] });
  });

  it("lists every problem with a dotted path", () => {
    const result = validateParameters(
      { parameters: scattering },
      { molecule: "nh3", energiesEv: [1, -2], basis: {}, extra: true, startedAt: "yesterday" },
    );
    expect(result.valid).toBe(false);
    if (result.valid) return;
    expect(result.errors).toEqual(
      expect.arrayContaining([
        { path: "molecule", message: 'must be one of "h2o", "ch4"' },
        { path: "energiesEv.1", message: "must be > 0" },
        { path: "basis.name", message: "is required" },
        { path: "extra", message: "is not a parameter of this code" },
        { path: "startedAt", message: 'must match format "date-time"' },
      ]),
    );
    expect(result.errors).toHaveLength(5);
  });

  it("names missing required parameters", () => {
    const result = validateParameters({ parameters: scattering }, {});
    expect(result).toEqual({
      valid: false,
      errors: [
        { path: "molecule", message: "is required" },
        { path: "energiesEv", message: "is required" },
      ],
    });
  });
});

describe("compileParameterSchema", () => {
  it("compiles a schema once, whatever the key order", () => {
    const reordered = {
      properties: scattering.properties,
      required: scattering.required,
      additionalProperties: false,
      type: "object",
    };
    expect(schemaHash(reordered)).toBe(schemaHash(scattering));
    expect(compileParameterSchema(reordered)).toBe(compileParameterSchema(scattering));
  });

  it("refuses a schema that does not describe an object", () => {
    expect(() => compileParameterSchema({ type: "array" })).toThrow(/type": "object"/);
  });

  it("refuses an invalid schema with Ajv's explanation", () => {
    expect(() => compileParameterSchema({ type: "object", properties: { a: { type: "strnig" } } })).toThrow(
      ParameterSchemaError,
    );
    expect(() => compileParameterSchema({ type: "object", properties: { a: { minimun: 1 } } })).toThrow(
      /unknown keyword: "minimun"/,
    );
  });

  it("refuses references it cannot resolve instead of fetching them", () => {
    expect(() =>
      compileParameterSchema({ type: "object", properties: { a: { $ref: "https://example.org/s.json" } } }),
    ).toThrow(/can't resolve reference/);
  });

  it("lets two schemas use the same $id", () => {
    compileParameterSchema({ $id: "urn:sigmaflow:p", type: "object", properties: { a: { type: "string" } } });
    expect(() =>
      compileParameterSchema({
        $id: "urn:sigmaflow:p",
        type: "object",
        properties: { b: { type: "number" } },
      }),
    ).not.toThrow();
  });
});

describe("patterns in a parameters schema", () => {
  const withPattern = (pattern: string) => ({
    type: "object",
    properties: { label: { type: "string", pattern } },
  });

  // Regression: Ajv tested `pattern` with JavaScript's backtracking RegExp, so ^(a+)+$ against a value of a
  // few dozen characters held the server for seconds, doubling per character.
  it("tests a nested-quantifier pattern against 5000 characters without backtracking", () => {
    const sources = regExpSourcesRunDuring(() =>
      validateParameters({ parameters: withPattern("^(a+)+$") }, { label: "aab" }),
    );
    expect(sources).not.toContain("^(a+)+$");
    const value = `${"a".repeat(5000)}b`;
    expect(validateParameters({ parameters: withPattern("^(a+)+$") }, { label: value })).toEqual({
      valid: false,
      errors: [{ path: "label", message: 'must match pattern "^(a+)+$"' }],
    });
    expect(validateParameters({ parameters: withPattern("^(a+)+$") }, { label: "aaaa" }).valid).toBe(true);
  });

  it("uses RE2 for patternProperties, also when properties match them", () => {
    const schema = {
      type: "object",
      properties: { aaaaaaaaaaaaaaaaaaaaaaaaaaaaaab: { type: "string" } },
      patternProperties: { "^(a+)+$": { type: "number" }, "^x_\\d+$": { type: "integer" } },
      additionalProperties: false,
    };
    expect(validateParameters({ parameters: schema }, { aaaa: 1, x_12: 3 }).valid).toBe(true);
    const refused = validateParameters({ parameters: schema }, { aaaa: "one", y: 1 });
    expect(refused.valid).toBe(false);
    if (refused.valid) return;
    expect(refused.errors).toHaveLength(2);
    expect(refused.errors).toEqual(
      expect.arrayContaining([
        { path: "aaaa", message: "must be number" },
        { path: "y", message: "is not a parameter of this code" },
      ]),
    );
  });

  it("accepts RE2 spellings such as inline flags", () => {
    expect(validateParameters({ parameters: withPattern("(?i)^h2o$") }, { label: "H2O" }).valid).toBe(true);
  });

  it("refuses a pattern RE2 cannot run, quoting it and naming RE2 syntax", () => {
    expect(() => compileParameterSchema(withPattern("^(a+)\\1$"))).toThrow(
      /^The parameters schema has a pattern Sigmaflow cannot use, "\^\(a\+\)\\\\1\$": backreferences .* RE2 syntax/,
    );
    expect(() => compileParameterSchema({ type: "object", patternProperties: { "a(?=b)": {} } })).toThrow(
      /cannot use, "a\(\?=b\)": lookahead/,
    );
  });

  it("turns a stored schema that no longer compiles into a problem, not an exception", () => {
    expect(validateParameters({ parameters: withPattern("(a)\\1") }, { label: "aa" })).toEqual({
      valid: false,
      errors: [{ path: "", message: expect.stringMatching(/^the code cannot be run: .*backreferences/) }],
    });
  });
});

describe("nesting limits", () => {
  const nested = (levels: number): unknown => {
    let value: unknown = 1;
    for (let i = 0; i < levels; i += 1) value = { a: value };
    return value;
  };

  // Regression: parameters nested 5000 levels deep overflowed the stack (RangeError) in the recursive
  // walks over them, a 500 instead of a refusal.
  it("refuses parameters nested 5000 levels deep with the path and the limit", () => {
    const result = validateParameters({ parameters: { type: "object" } }, { p: nested(5000) });
    expect(result).toEqual({
      valid: false,
      errors: [
        {
          path: `p${".a".repeat(MAX_JSON_DEPTH - 1)}`,
          message: `is nested more than ${MAX_JSON_DEPTH} levels deep`,
        },
      ],
    });
  });

  it("accepts parameters exactly at the limit", () => {
    expect(
      validateParameters({ parameters: { type: "object" } }, nested(MAX_JSON_DEPTH - 1) as object).valid,
    ).toBe(true);
  });

  it("refuses a schema nested 5000 levels deep", () => {
    expect(() => compileParameterSchema({ type: "object", properties: { p: nested(5000) } })).toThrow(
      new RegExp(`^The parameters schema nests more than ${MAX_JSON_DEPTH} levels deep`),
    );
  });
});

describe("asynchronous schemas", () => {
  // An async validator returns a promise, which read as "valid" for any input, and its rejection went
  // unobserved (an unhandled rejection ends the process).
  it("are refused", () => {
    expect(() => compileParameterSchema({ $async: true, type: "object" })).toThrow(/cannot be asynchronous/);
  });
});

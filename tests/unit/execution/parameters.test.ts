/**
 * Run parameters against a code's JSON Schema (draft 2020-12, validated by Ajv). Expected verdicts follow
 * the JSON Schema 2020-12 validation vocabulary (json-schema.org/draft/2020-12/json-schema-validation)
 * and RFC 3339 for "date-time".
 */
import { describe, expect, it } from "vitest";
import {
  compileParameterSchema,
  ParameterSchemaError,
  schemaHash,
  validateParameters,
} from "../../../server/execution/parameters";

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

/**
 * The composer's in-browser parameter check (src/features/composer/parameter-resolver.ts) against the
 * server's validator, Ajv 2020 (server/execution/parameters.ts), as the reference: for each case, the same
 * parameters are refused at the same top-level parameter with the same message, or both accept.
 */
import { describe, expect, it } from "vitest";
import { radialScatterDefinition } from "../../../deploy/demo/codes/radial-scatter";
import { validateParameters } from "../../../server/execution/parameters";
import { checkParameters } from "../../../src/features/composer/parameter-resolver";

const radialScatter = radialScatterDefinition("/bin/true").parameters as Record<string, unknown>;

const patterned = {
  type: "object",
  additionalProperties: false,
  required: ["basis"],
  properties: {
    basis: { type: "string", pattern: "^[a-z0-9-]+$", minLength: 2, maxLength: 12 },
    label: { type: "string", enum: ["A1", "B2"] },
    steps: { type: "integer", multipleOf: 5, exclusiveMaximum: 100 },
    tags: { type: "array", items: { type: "string" }, uniqueItems: true, maxItems: 3 },
    pairs: { type: "array", items: { type: "array" }, uniqueItems: true },
  },
};

/** The server's problems as { parameter: message }, first per top-level parameter. */
function serverProblems(schema: Record<string, unknown>, parameters: Record<string, unknown>) {
  const check = validateParameters({ parameters: schema }, parameters);
  if (check.valid) return {};
  const problems: Record<string, string> = {};
  for (const { path, message } of check.errors) {
    const [name = "", ...inner] = path.split(".");
    problems[name] ??= inner.length > 0 ? `${inner.join(".")}: ${message}` : message;
  }
  return problems;
}

function browserProblems(schema: Record<string, unknown>, parameters: Record<string, unknown>) {
  return Object.fromEntries(
    Object.entries(checkParameters(schema, parameters)).map(([name, error]) => [name, error.message]),
  );
}

const CASES: [string, Record<string, unknown>, Record<string, unknown>][] = [
  ["radial-scatter: valid with defaults", radialScatter, { polarizabilityBohr3: 9.6 }],
  ["radial-scatter: required left out", radialScatter, {}],
  ["radial-scatter: lmax above maximum", radialScatter, { polarizabilityBohr3: 9.6, lmax: 40 }],
  ["radial-scatter: lmax not whole", radialScatter, { polarizabilityBohr3: 9.6, lmax: 2.5 }],
  ["radial-scatter: energy not above 0", radialScatter, { polarizabilityBohr3: 1, energiesEv: [0.5, 0] }],
  ["radial-scatter: empty grid", radialScatter, { polarizabilityBohr3: 1, energiesEv: [] }],
  ["radial-scatter: unknown parameter", radialScatter, { polarizabilityBohr3: 1, spin: 2 }],
  ["radial-scatter: wrong type", radialScatter, { polarizabilityBohr3: "9.6", useStageDensity: "yes" }],
  ["pattern, lengths: valid", patterned, { basis: "cc-pvdz", steps: 95, tags: ["a", "b"] }],
  ["pattern refused", patterned, { basis: "cc pVDZ" }],
  ["too short, enum, multipleOf", patterned, { basis: "c", label: "A2", steps: 7 }],
  ["exclusive maximum, duplicates", patterned, { basis: "ok", steps: 100, tags: ["a", "a"] }],
  ["too many items", patterned, { basis: "ok", tags: ["a", "b", "c", "d"] }],
  ["duplicates further apart", patterned, { basis: "ok", tags: ["x", "a", "x"] }],
  ["duplicate arrays", patterned, { basis: "ok", pairs: [[1], [2], [1, 2], [2]] }],
];

describe("the composer's parameter check agrees with the server's Ajv", () => {
  for (const [name, schema, parameters] of CASES) {
    it(name, () => {
      expect(browserProblems(schema, parameters)).toEqual(serverProblems(schema, parameters));
    });
  }
  it("refuses what it should (the cases are not all valid)", () => {
    expect(Object.keys(browserProblems(radialScatter, { lmax: 40 })).sort()).toEqual([
      "lmax",
      "polarizabilityBohr3",
    ]);
  });
});

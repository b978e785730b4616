/**
 * Request bodies nesting objects and arrays too deeply are refused with a 422 before anything walks them
 * recursively. Depths are counted by hand from the literals below.
 */
import type { Request } from "express";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { AppError } from "../../../server/http/errors";
import { MAX_BODY_DEPTH, parseBody } from "../../../server/http/validate";
import { findExcessDepth } from "../../../shared/json-depth";

function nested(levels: number): unknown {
  let value: unknown = "leaf";
  for (let i = 0; i < levels; i += 1) value = i % 2 ? [value] : { a: value };
  return value;
}

describe("findExcessDepth", () => {
  it("counts objects and arrays, not scalars", () => {
    expect(findExcessDepth("text", 0)).toBeNull();
    expect(findExcessDepth({}, 1)).toBeNull();
    expect(findExcessDepth({}, 0)).toEqual({ path: [] });
    expect(findExcessDepth({ a: [1, { b: null }] }, 3)).toBeNull();
    expect(findExcessDepth({ a: [1, { b: null }] }, 2)).toEqual({ path: ["a", "1"] });
  });

  it("walks 100 000 levels without recursion", () => {
    expect(findExcessDepth(nested(100_000), 100_000)).toBeNull();
    expect(findExcessDepth(nested(100_000), 99_999)?.path).toHaveLength(99_999);
  });
});

describe("parseBody", () => {
  const schema = z.object({ spec: z.object({ parameters: z.record(z.string(), z.unknown()) }) });
  const request = (body: unknown) => ({ body }) as Request;

  // Regression: a run whose parameters nested 5000 levels deep passed the contract (z.unknown) and then
  // overflowed the stack in the recursive walks over it, answering 500 instead of 422.
  it("refuses a body nested 5000 levels deep with a 422 naming the path and the limit", () => {
    let caught: unknown;
    try {
      parseBody(schema, request({ spec: { parameters: { inner: nested(5000) } } }));
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(AppError);
    const error = caught as AppError;
    expect(error.status).toBe(422);
    expect(error.code).toBe("validation_failed");
    // spec, parameters and inner lead to level 4; 29 more keys reach the first container past level 32.
    expect(error.message).toMatch(
      /^The request body is invalid: spec\.parameters\.inner(\.(0|a)){29} is nested more than 32 levels deep; objects and arrays may nest at most 32 levels\.$/,
    );
    expect(error.details).toEqual([
      {
        path: expect.stringMatching(/^spec\.parameters\.inner\./),
        message: `Nested more than ${MAX_BODY_DEPTH} levels deep.`,
      },
    ]);
  });

  it("accepts a body exactly at the limit", () => {
    const body = { spec: { parameters: { inner: nested(MAX_BODY_DEPTH - 3) } } };
    expect(parseBody(schema, request(body))).toEqual(body);
    expect(() =>
      parseBody(schema, request({ spec: { parameters: { inner: nested(MAX_BODY_DEPTH - 2) } } })),
    ).toThrow(AppError);
  });
});

/**
 * canonicalJson decides fingerprint equality (and the parameter-schema validator cache), so its text is
 * pinned: expected strings are written by hand from the rule (keys sorted by UTF-16 code units at every
 * depth, `undefined` properties left out, arrays in their order, scalars as JSON.stringify writes them).
 */
import { describe, expect, it } from "vitest";
import { canonicalJson } from "../../../shared/canonical-json";

describe("canonicalJson", () => {
  it("sorts keys, so two spellings of one object give one text", () => {
    expect(canonicalJson({ b: 1, a: 2 })).toBe('{"a":2,"b":1}');
    expect(canonicalJson({ a: 2, b: 1 })).toBe(canonicalJson({ b: 1, a: 2 }));
  });

  it("orders keys by UTF-16 code units: upper case before lower, digits first, no locale rules", () => {
    expect(canonicalJson({ b: 0, B: 0, a: 0, "10": 0, "9": 0, é: 0 })).toBe(
      '{"10":0,"9":0,"B":0,"a":0,"b":0,"é":0}',
    );
  });

  it("sorts at every depth, including objects inside arrays", () => {
    const value = { z: { y: [{ d: 1, c: 2 }, 3], x: { b: null, a: "s" } }, a: [] };
    expect(canonicalJson(value)).toBe('{"a":[],"z":{"x":{"a":"s","b":null},"y":[{"c":2,"d":1},3]}}');
  });

  it("keeps the order of arrays", () => {
    expect(canonicalJson([3, 1, 2])).toBe("[3,1,2]");
    expect(canonicalJson([3, 1, 2])).not.toBe(canonicalJson([1, 2, 3]));
  });

  it("leaves out undefined properties but keeps null", () => {
    expect(canonicalJson({ a: undefined, b: null })).toBe('{"b":null}');
    expect(canonicalJson({ a: undefined })).toBe(canonicalJson({}));
  });

  it("writes scalars and escapes keys as JSON does", () => {
    expect(canonicalJson('it\'s "quoted"\n')).toBe(JSON.stringify('it\'s "quoted"\n'));
    expect(canonicalJson(1.5e-7)).toBe("1.5e-7");
    expect(canonicalJson(true)).toBe("true");
    expect(canonicalJson(null)).toBe("null");
    expect(canonicalJson({ 'k"ey': 1 })).toBe('{"k\\"ey":1}');
  });
});

/**
 * Members' regular expressions compiled for RE2 (re2js). Expected matches follow RE2's syntax reference
 * (github.com/google/re2/wiki/Syntax) and, for replacement strings, ECMA-262 GetSubstitution
 * (`$1`, `$<name>`, `$&`, `$$`). Instruction counts are re2js's own `programSize()`.
 */
import { describe, expect, it } from "vitest";
import {
  compileUserPattern,
  estimatedProgramSize,
  MAX_PATTERN_LENGTH,
  MAX_PROGRAM_SIZE,
  PatternError,
  patternProblem,
} from "../../../server/execution/user-patterns";

function reasonFor(source: string, flags = ""): string {
  try {
    compileUserPattern(source, flags);
  } catch (error) {
    expect(error).toBeInstanceOf(PatternError);
    return (error as PatternError).reason;
  }
  throw new Error(`${source} compiled`);
}

describe("compileUserPattern", () => {
  // Regression: members' patterns ran on JavaScript's backtracking RegExp, where ^(a+)+$ takes time
  // doubling with each character of a non-matching text; one such pattern froze the server for everyone.
  it("answers a nested quantifier against 5000 characters without backtracking", () => {
    const pattern = compileUserPattern("^(a+)+$");
    expect(pattern.test(`${"a".repeat(5000)}b`)).toBe(false);
    expect(pattern.test("a".repeat(5000))).toBe(true);
    expect(pattern.matchGroups(`${"a".repeat(5000)}b`)).toBeNull();
    expect(pattern.replace(`${"a".repeat(5000)}b`, "x")).toBe(`${"a".repeat(5000)}b`);
  });

  it("reads named groups in both spellings RE2 accepts", () => {
    const line = "symmetry B1u done in 3.25 s";
    expect(
      compileUserPattern("^symmetry (?<symmetry>\\S+) done in (?<seconds>[0-9.]+) s$").matchGroups(line),
    ).toEqual({ symmetry: "B1u", seconds: "3.25" });
    expect(compileUserPattern("(?P<symmetry>B\\d\\w)").matchGroups(line)).toEqual({ symmetry: "B1u" });
    expect(compileUserPattern("done").matchGroups(line)).toEqual({});
    expect(compileUserPattern("absent").matchGroups(line)).toBeNull();
  });

  it("takes the flags i, m, s and g as JavaScript does", () => {
    expect(compileUserPattern("abc", "i").test("xABCx")).toBe(true);
    expect(compileUserPattern("^b$", "m").test("a\nb\nc")).toBe(true);
    expect(compileUserPattern("^b$").test("a\nb\nc")).toBe(false);
    expect(compileUserPattern("a.b", "s").test("a\nb")).toBe(true);
    expect(compileUserPattern("a.b").test("a\nb")).toBe(false);
    expect(compileUserPattern("a", "u").test("a")).toBe(true);
    expect(compileUserPattern("a").replace("aaa", "b")).toBe("baa");
    expect(compileUserPattern("a", "g").replace("aaa", "b")).toBe("bbb");
  });

  it("expands replacement references like String.prototype.replace", () => {
    expect(compileUserPattern("(a)(?<n>b)", "g").replace("abab", "[$2$1$<n>$&$$]")).toBe("[babab$][babab$]");
    // An empty match between every character, as "abc".replace(/x*/g, "_") gives.
    expect(compileUserPattern("x*", "g").replace("abc", "_")).toBe("_a_b_c_");
  });

  it("prints as a regex literal and is cached per source and flags", () => {
    expect(String(compileUserPattern("a/b", "gi"))).toBe("/a/b/gi");
    expect(compileUserPattern("cache-me", "i")).toBe(compileUserPattern("cache-me", "i"));
    expect(compileUserPattern("cache-me", "i")).not.toBe(compileUserPattern("cache-me"));
  });

  it("refuses to split a string, rather than splitting by the pattern's printed text", () => {
    expect(() => "a,b".split(compileUserPattern(",") as never)).toThrow(/cannot split a string/);
  });

  it("says what RE2 lacks and that patterns are RE2 syntax", () => {
    expect(reasonFor("(a+)\\1")).toMatch(/^backreferences such as \\1 are not supported\. .*RE2 syntax/);
    expect(reasonFor("(?<w>a)\\k<w>")).toMatch(/^named backreferences .* not supported/);
    expect(reasonFor("a(?=b)")).toMatch(/^lookahead .* not supported/);
    expect(reasonFor("a(?!b)")).toMatch(/^lookahead .* not supported/);
    expect(reasonFor("(?<=a)b")).toMatch(/^lookbehind .* not supported/);
    expect(reasonFor("(?<!a)b")).toMatch(/^lookbehind .* not supported/);
    expect(reasonFor("a++")).toMatch(/^possessive quantifiers/);
    expect(reasonFor("\\u00e9")).toMatch(/\\x\{00E9\}/);
    expect(reasonFor("[a-")).toMatch(/^missing closing \]/);
    expect(reasonFor("a{2000}")).toMatch(/limited to 1000|more than the 1000 allowed/);
    for (const reason of [reasonFor("(a+)\\1"), reasonFor("a(?=b)"), reasonFor("[a-")]) {
      expect(reason).toContain("https://github.com/google/re2/wiki/Syntax");
    }
  });

  it("refuses flags other than g, i, m, s, u", () => {
    expect(reasonFor("a", "y")).toMatch(/^the flag "y" is not supported/);
    expect(reasonFor("a", "d")).toMatch(/^the flag "d" is not supported/);
  });

  it("refuses a source longer than the limit", () => {
    expect(patternProblem("a".repeat(MAX_PATTERN_LENGTH))).toBeNull();
    expect(reasonFor("a".repeat(MAX_PATTERN_LENGTH + 1))).toBe(
      `the pattern is ${MAX_PATTERN_LENGTH + 1} characters long; patterns are limited to ${MAX_PATTERN_LENGTH}`,
    );
  });

  it("refuses a pattern whose counted repetitions expand past the program limit", () => {
    // 490 characters that would compile to 70 002 instructions.
    const wide = "x{1000}".repeat(70);
    expect(estimatedProgramSize(wide)).toBe(70_000);
    expect(reasonFor(wide)).toMatch(
      /^the pattern expands to about 70000 steps .* more than the 1000 allowed/,
    );
    // RE2's own nesting limit (a product of 1000) still leaves 3002 instructions for a captured group.
    expect(reasonFor("(x){1000}")).toMatch(/expands to about \d+ steps/);
    expect(compileUserPattern("^[A-Za-z0-9._-]{1,255}$").programSize).toBeLessThanOrEqual(MAX_PROGRAM_SIZE);
  });
});

describe("estimatedProgramSize", () => {
  it("counts atoms once and multiplies what a count repeats, nested or not", () => {
    expect(estimatedProgramSize("abc")).toBe(3);
    expect(estimatedProgramSize("a{10}")).toBe(10);
    expect(estimatedProgramSize("(ab){10}")).toBe(20);
    expect(estimatedProgramSize("((a{10}){10}){10}")).toBe(1000);
    expect(estimatedProgramSize("a{2,}")).toBe(3);
    expect(estimatedProgramSize("[a-z{}]{4}")).toBe(4);
    expect(estimatedProgramSize("\\p{Greek}{5}")).toBe(5);
    expect(estimatedProgramSize("a|b{3}")).toBe(4);
  });

  it("stays at or below the compiled size, so it never refuses what compiles within the limit", () => {
    for (const source of [
      "^(a+)+$",
      "a{10}b{20}",
      "(x|y){1,100}",
      "[\\p{L}\\p{N}]{500}",
      "((a{10}){10}){5}",
    ]) {
      expect(estimatedProgramSize(source)).toBeLessThanOrEqual(compileUserPattern(source).programSize);
    }
  });
});

/**
 * The one rule for where sign-in may return to, used by the server (GET /api/auth/login) and the client
 * (sign-in page links, the loader that leaves /signin).
 */
import { describe, expect, it } from "vitest";
import { MAX_RETURN_TO_LENGTH, safeReturnTo } from "../../../shared/return-to";

describe("safeReturnTo", () => {
  it("keeps a path on this site, query and fragment included", () => {
    expect(safeReturnTo("/groups/g1/runs?state=running#top")).toBe("/groups/g1/runs?state=running#top");
  });

  it.each([
    ["protocol-relative", "//evil.example/steal"],
    ["a backslash right after the slash", "/\\evil.example"],
    ["a backslash anywhere", "/groups\\..\\evil"],
    ["a tab browsers would drop", "/\t/evil.example"],
    ["a newline", "/groups\n"],
    ["an absolute address", "https://evil.example/"],
    ["a relative path", "groups"],
    ["the sign-in page", "/signin?returnTo=%2F"],
    ["an empty string", ""],
    ["a path longer than the limit", `/${"a".repeat(MAX_RETURN_TO_LENGTH)}`],
  ])("refuses %s", (_what, value) => {
    expect(safeReturnTo(value)).toBe("/");
    expect(safeReturnTo(value, "/groups")).toBe("/groups");
  });

  it("refuses what is not a string", () => {
    expect(safeReturnTo(undefined)).toBe("/");
    expect(safeReturnTo(null)).toBe("/");
    expect(safeReturnTo(["/groups"])).toBe("/");
  });

  it("keeps a path of exactly the limit", () => {
    const longest = `/${"a".repeat(MAX_RETURN_TO_LENGTH - 1)}`;
    expect(safeReturnTo(longest)).toBe(longest);
  });
});

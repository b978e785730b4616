/**
 * Input-file rendering: hostile parameter values must come out as data, never as syntax, in every format.
 * Checked against the format's own reader where one is at hand:
 *   shell    → /bin/sh itself (POSIX.1-2017 XCU §2.2.2: inside single quotes every character is literal)
 *   json     → JSON.parse (RFC 8259)
 *   namelist → the Fortran rule for apostrophe-delimited character constants (ISO/IEC 1539-1:2018
 *              §7.4.4.3: a doubled apostrophe stands for one apostrophe), decoded by hand below
 * Comparisons are exact.
 */
import { execFileSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import {
  checkCodeTemplates,
  renderCodeFiles,
  TemplateError,
} from "../../../server/execution/templates/render";
import { type CodeDefinition, codeDefinitionSchema } from "../../../shared/schemas/codes";
import { regExpSourcesRunDuring } from "./native-regexp";

const HOSTILE: Record<string, string> = {
  singleQuote: "it's",
  doubleQuote: 'say "hi"',
  commandSubstitution: "$(touch /tmp/sigmaflow-pwned)",
  backticks: "`id`",
  // biome-ignore lint/suspicious/noTemplateCurlyInString: a literal shell parameter expansion is the point.
  variable: "$HOME and ${PATH}",
  semicolon: "x'; rm -rf / #",
  backslash: "a\\b\\'c",
  parentDir: "../../etc/passwd",
  glob: "* ? [a-z]",
  unicode: "Ψ₀ → σ(E) Å",
  long: "ab'$\"".repeat(20_000),
};

function definition(inputTemplates: CodeDefinition["inputTemplates"], args: string[] = []): CodeDefinition {
  return codeDefinitionSchema.parse({
    name: "probe",
    version: "1",
    executable: "probe",
    inputTemplates,
    arguments: args,
  });
}

function renderOne(
  format: CodeDefinition["inputTemplates"][number]["format"],
  template: string,
  params: object,
) {
  const def = definition([{ fileName: "input.dat", format, template }]);
  return renderCodeFiles(def, params as Record<string, unknown>).files[0]!.content;
}

/** Apostrophe-delimited Fortran character constant → its value (ISO/IEC 1539-1:2018 §7.4.4.3). */
function decodeFortranString(literal: string): string {
  expect(literal.startsWith("'") && literal.endsWith("'")).toBe(true);
  const body = literal.slice(1, -1);
  expect(body.replaceAll("''", "")).not.toContain("'");
  return body.replaceAll("''", "'");
}

describe("shell format", () => {
  for (const [label, value] of Object.entries(HOSTILE)) {
    it(`passes ${label} to the shell as one literal word`, () => {
      const script = renderOne("shell", "printf '%s' {{ value }}", { value });
      // The script goes in on standard input: a 100 kB word is longer than one exec argument may be.
      const output = execFileSync("/bin/sh", [], { input: script, encoding: "utf8", maxBuffer: 10_000_000 });
      expect(output).toBe(value);
    });
  }

  it("keeps newlines inside the quoted word", () => {
    const value = "line one\nline two\n; echo injected";
    const output = execFileSync("/bin/sh", ["-c", renderOne("shell", "printf '%s' {{ v }}", { v: value })], {
      encoding: "utf8",
    });
    expect(output).toBe(value);
  });

  it("prints a list as separate quoted words", () => {
    const script = renderOne("shell", "printf '<%s>' {{ files }}", { files: ["a b", "c'd", "$(x)"] });
    expect(execFileSync("/bin/sh", ["-c", script], { encoding: "utf8" })).toBe("<a b><c'd><$(x)>");
  });

  it("refuses a NUL character, which no shell word can carry", () => {
    expect(() => renderOne("shell", "{{ v }}", { v: "a\0b" })).toThrow(
      /input\.dat: parameter v contains a NUL/,
    );
  });
});

describe("json format", () => {
  for (const [label, value] of Object.entries(HOSTILE)) {
    it(`writes ${label} as a JSON string literal`, () => {
      const text = renderOne("json", '{"value": {{ value }}}', { value });
      expect(JSON.parse(text)).toEqual({ value });
    });
  }

  it("escapes newlines and control characters instead of refusing them", () => {
    const value = 'a\nb\t"c"\u0001';
    expect(JSON.parse(renderOne("json", "{{ v }}", { v: value }))).toBe(value);
  });

  it("writes numbers, booleans, null, lists and objects as JSON values", () => {
    // (`none` is a nunjucks literal for null, so the parameter is called `nothing`.)
    const params = {
      n: -1.5e-7,
      flag: false,
      nothing: null,
      list: [1, "x'y", true],
      obj: { 'k"ey': "v", deep: [null] },
    };
    const text = renderOne(
      "json",
      '{"n": {{ n }}, "flag": {{ flag }}, "nothing": {{ nothing }}, "list": {{ list }}, "obj": {{ obj }}}',
      params,
    );
    expect(JSON.parse(text)).toEqual(params);
  });
});

describe("namelist format", () => {
  const oneLine = Object.entries(HOSTILE);
  for (const [label, value] of oneLine) {
    it(`writes ${label} as a Fortran character constant`, () => {
      const text = renderOne("namelist", "&input title = {{ value }} /", { value });
      const literal = text.slice("&input title = ".length, -" /".length);
      expect(decodeFortranString(literal)).toBe(value);
    });
  }

  it("writes logicals as .true./.false. and numbers as given, while conditions still see booleans", () => {
    const text = renderOne(
      "namelist",
      "&input a = {{ on }}, b = {{ off }}, e = {{ energy }}, n = {{ n }} /{% if off %} never{% endif %}",
      { on: true, off: false, energy: 0.25, n: 12 },
    );
    expect(text).toBe("&input a = .true., b = .false., e = 0.25, n = 12 /");
  });

  it("writes a list as a comma-separated value list", () => {
    expect(renderOne("namelist", "x = {{ xs }}", { xs: [1, 2.5, "a'b"] })).toBe("x = 1, 2.5, 'a''b'");
  });

  it("refuses a newline inside a string", () => {
    expect(() => renderOne("namelist", "t = {{ t }}", { t: "a\n/ &evil" })).toThrow(/control character/);
  });

  it("refuses to print an object", () => {
    expect(() => renderOne("namelist", "{{ o }}", { o: { a: 1 } })).toThrow(/print its fields/);
  });
});

describe("text format", () => {
  it("writes strings as given, '../' included", () => {
    expect(renderOne("text", "{{ p }} {{ q }}", { p: "../../x", q: "it's $(x)" })).toBe("../../x it's $(x)");
  });

  for (const [label, value] of [
    ["newline", "a\nb"],
    ["carriage return", "a\rb"],
    ["tab", "a\tb"],
    ["escape", "a\u001b[31mb"],
    ["line separator", "a\u2028b"],
  ] as const) {
    it(`refuses a ${label}`, () => {
      expect(() => renderOne("text", "{{ v }}", { v: value })).toThrow(
        /^input\.dat: parameter v contains a control character/,
      );
    });
  }

  it("also refuses control characters nested in lists and objects, naming where", () => {
    expect(() => renderOne("text", "x", { outer: { list: ["ok", "bad\n"] } })).toThrow(
      /parameter outer\.list\[1\] contains a control character/,
    );
  });
});

describe("values that are not text", () => {
  it("refuses lone UTF-16 surrogates in every format", () => {
    for (const format of ["text", "shell", "json", "namelist"] as const) {
      expect(() => renderOne(format, "{{ v }}", { v: "a\uD800b" })).toThrow(/lone UTF-16 surrogate/);
      expect(() => renderOne(format, "{{ v }}", { v: "\uDC00" })).toThrow(/lone UTF-16 surrogate/);
    }
  });

  it("accepts a proper surrogate pair (U+1F600)", () => {
    expect(renderOne("text", "{{ v }}", { v: "\uD83D\uDE00" })).toBe("😀");
  });
});

describe("arguments", () => {
  it("renders each argument as one argv entry, spaces and quotes kept", () => {
    const def = definition(
      [],
      ["--title={{ title }}", "{{ path }}", "{% if verbose %}--verbose{% endif %}", "-n"],
    );
    expect(renderCodeFiles(def, { title: "a b 'c' $(d)", path: "../x", verbose: false }).argv).toEqual([
      "--title=a b 'c' $(d)",
      "../x",
      "-n",
    ]);
  });

  it("refuses a newline in an argument value", () => {
    const def = definition([], ["{{ v }}"]);
    expect(() => renderCodeFiles(def, { v: "a\nb" })).toThrow(/^argument 1: parameter v contains a control/);
  });
});

describe("template errors", () => {
  it("name the file and line of a syntax error", () => {
    const problems = checkCodeTemplates(
      definition([{ fileName: "scatter.inp", format: "text", template: "ok\nstill ok\n{{ energy( }}\n" }]),
    );
    expect(problems).toEqual([
      { path: "inputTemplates.0.template", message: expect.stringMatching(/^scatter\.inp, line 3: /) },
    ]);
  });

  it("point at the end of the file when a tag is left open", () => {
    const problems = checkCodeTemplates(
      definition([{ fileName: "open.txt", format: "text", template: "a\nb\n{{ x" }]),
    );
    expect(problems[0]?.message).toMatch(
      /^open\.txt, line 3: .* at the end of the file \(is a tag left open\?\)$/,
    );
  });

  it("name the argument of a broken argument template", () => {
    const problems = checkCodeTemplates(definition([], ["ok", "{% if x %}"]));
    expect(problems).toHaveLength(1);
    expect(problems[0]!.path).toBe("arguments.1");
    expect(problems[0]!.message).toMatch(/^argument 2/);
  });

  it("name the file and line when an undefined value is printed", () => {
    let caught: unknown;
    try {
      renderOne("text", "a\nb {{ missing }}", {});
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(TemplateError);
    expect((caught as TemplateError).message).toMatch(
      /^input\.dat, line 2: prints a value that is not defined/,
    );
  });

  for (const [label, template] of [
    ["include", "{% include 'other.txt' %}"],
    ["import", "{% import 'macros.njk' as m %}"],
    ["from-import", "{% from 'macros.njk' import m %}"],
    ["extends", "{% extends '/etc/passwd' %}"],
    ["dynamic include", "{% include name %}"],
  ] as const) {
    it(`refuses ${label} before rendering`, () => {
      const problems = checkCodeTemplates(
        definition([{ fileName: "a.txt", format: "text", template: `x\n${template}` }]),
      );
      expect(problems[0]?.message).toMatch(/^a\.txt, line 2: templates cannot include, import or extend/);
    });
  }
});

describe("the template sandbox", () => {
  // Known escape from nunjucks templates into JavaScript: reach Function through `constructor`.
  const attacks = [
    '{{ "".constructor.constructor("return process")() }}',
    "{{ range.constructor('return process')() }}",
    '{% set k = "constr" ~ "uctor" %}{{ ""[k][k]("return 1")() }}',
    "{{ v.__proto__ }}",
    "{{ cycler.prototype }}",
  ];
  for (const template of attacks) {
    it(`refuses ${template}`, () => {
      expect(() => renderOne("text", template, { v: "x" })).toThrow(/templates cannot read/);
    });
  }

  it("resolves inherited names such as `constructor` to nothing", () => {
    // Object.getOwnPropertyDescriptor(...) through the context's inherited `constructor` would reach Function.
    expect(() => renderOne("text", "{{ constructor.getOwnPropertyDescriptor(range, 'name') }}", {})).toThrow(
      /input\.dat/,
    );
    expect(renderOne("text", "{{ 'no' if toString is defined else 'hidden' }}", {})).toBe("hidden");
  });

  it("still allows ordinary template work", () => {
    const text = renderOne(
      "text",
      "{% for e in energies %}{{ loop.index }}:{{ e.toFixed(2) }}{{ ',' if not loop.last }}{% endfor %} {{ name | upper }} {{ name.length }}",
      { energies: [0.5, 1.25], name: "ch4" },
    );
    expect(text).toBe("1:0.50,2:1.25 CH4 3");
  });

  it("caps range()", () => {
    expect(() => renderOne("text", "{{ range(1000000) | length }}", {})).toThrow(/range\(\) is limited/);
  });

  it("stops a loop nest that prints nothing but would run for hours, naming the line", () => {
    // 100 000 × 100 000 empty turns: each range() is within its cap, the nest is not.
    const nest = "x\n{% for i in range(100000) %}{% for j in range(100000) %}{% endfor %}{% endfor %}";
    const started = Date.now();
    let caught: unknown;
    try {
      renderOne("text", nest, {});
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(TemplateError);
    expect((caught as TemplateError).message).toMatch(/rendering took longer than 2000 ms/);
    expect((caught as TemplateError).line).toBe(2);
    // Generous bound (the limit plus one innermost loop), far below the hours the nest would take.
    expect(Date.now() - started).toBeLessThan(20_000);
    // The next render starts with a fresh clock.
    expect(renderOne("text", "{{ range(3) | length }}", {})).toBe("3");
  });
});

describe("regular expressions in templates", () => {
  // Regression: a regex literal reached the `replace` filter as a JavaScript RegExp, so
  // `replace(r/^(a+)+$/, …)` on a 29-character value held the server for 9.7 s while a run was created.
  it("matches a nested-quantifier regex literal against 5000 characters without backtracking", () => {
    const template = '{{ v | replace(r/^(a+)+$/, "x") }}';
    expect(regExpSourcesRunDuring(() => renderOne("text", template, { v: "aab" }))).not.toContain("^(a+)+$");
    expect(renderOne("text", template, { v: `${"a".repeat(5000)}b` })).toBe(`${"a".repeat(5000)}b`);
    expect(renderOne("text", template, { v: "a".repeat(5000) })).toBe("x");
  });

  it("replaces the first match, or every match with g, expanding $ references", () => {
    expect(renderOne("text", '{{ v | replace(r/o/, "0") }}', { v: "foo boo" })).toBe("f0o boo");
    expect(renderOne("text", '{{ v | replace(r/o/g, "0") }}', { v: "foo boo" })).toBe("f00 b00");
    expect(renderOne("text", '{{ v | replace(r/(\\w+)=(\\w+)/g, "$2=$1") }}', { v: "a=1 b=2" })).toBe(
      "1=a 2=b",
    );
    expect(renderOne("text", '{{ v | replace(r/H2O/i, "water") }}', { v: "h2o" })).toBe("water");
    expect(renderOne("text", '{{ v | replace("o", "0") }}', { v: "foo" })).toBe("f00");
  });

  it("keeps a replaced parameter written for the file's format", () => {
    // The value arrives as the shell word 'it'\''s'; replacing its "t" leaves one literal word.
    const script = renderOne("shell", "printf '%s' {{ v | replace(r/t/g, 'T') }}", { v: "it's" });
    expect(execFileSync("/bin/sh", ["-c", script], { encoding: "utf8" })).toBe("iT's");
  });

  for (const [label, literal, reason] of [
    ["a backreference", "r/(a)\\1/", /backreferences such as \\1 are not supported/],
    ["lookahead", "r/a(?=b)/", /lookahead/],
    ["the sticky flag", "r/a/y", /the flag "y" is not supported/],
  ] as const) {
    it(`refuses ${label} when the code is registered, naming the line and RE2 syntax`, () => {
      const problems = checkCodeTemplates(
        definition([{ fileName: "a.txt", format: "text", template: `x\n{{ v | replace(${literal}, "") }}` }]),
      );
      expect(problems).toHaveLength(1);
      expect(problems[0]!.message).toMatch(/^a\.txt, line 2: the pattern r\//);
      expect(problems[0]!.message).toMatch(reason);
      expect(problems[0]!.message).toContain("RE2 syntax");
    });
  }

  it("refuses a pattern as the separator of split", () => {
    expect(() => renderOne("text", "{{ v.split(r/,/) | join('+') }}", { v: "a,b" })).toThrow(
      /cannot split a string; split by a string instead/,
    );
    expect(renderOne("text", "{{ v.split(',') | join('+') }}", { v: "a,b" })).toBe("a+b");
  });

  // Regression: nunjucks' own `trim` and `striptags` use patterns that backtrack quadratically on a long
  // run of spaces or of unclosed tags; a 100 000-character parameter held the server for seconds.
  it("trims and strips tags from 100 000-character values in one pass", () => {
    const quadratic = ["^\\s*|\\s*$", "^ +| +$", "<\\/?([a-z][a-z0-9]*)\\b[^>]*>|<!--[\\s\\S]*?-->"];
    const sources = regExpSourcesRunDuring(() =>
      renderOne("text", "{{ v | trim | striptags(true) }}", { v: " <b>x</b> " }),
    );
    expect(sources.filter((source) => quadratic.includes(source))).toEqual([]);
    const spaced = `a${" ".repeat(100_000)}b`;
    expect(renderOne("text", "[{{ v | trim }}]", { v: `  ${spaced}  ` })).toBe(`[${spaced}]`);
    expect(renderOne("text", "{{ v | striptags(true) }}", { v: spaced })).toBe("a b");
    expect(renderOne("text", "{{ v | striptags }}", { v: "<a".repeat(50_000) })).toBe("<a".repeat(50_000));
  });

  it("strips tags as nunjucks does", () => {
    // Expected outputs are those of nunjucks 3.2.4's own striptags on the same text.
    const html = "{% set h %}  <p class='x'>Ψ₀  <b>bold</b></p>\n\n\n\n<!-- a\ncomment -->end  {% endset %}";
    expect(renderOne("text", `${html}{{ h | striptags }}`, {})).toBe("Ψ₀ bold end");
    expect(renderOne("text", `${html}{{ h | striptags(true) }}`, {})).toBe("Ψ₀ bold\n\nend");
  });
});

describe("raw blocks", () => {
  it("print their content as written", () => {
    expect(renderOne("text", "{% raw %}{{ not a tag }}{% endraw %}={{ v }}", { v: 1 })).toBe(
      "{{ not a tag }}=1",
    );
  });

  // Regression: nunjucks searches for the end of a raw block from every position of the rest of the
  // template, so a 200 000-character template with an unclosed {% raw %} took many seconds to refuse
  // (this one, 35 000 characters, about half a second).
  it("are refused when never closed, before nunjucks searches for the end", () => {
    const template = `x\n{% raw %}${"{% x %}".repeat(5_000)}`;
    const problems = checkCodeTemplates(definition([{ fileName: "a.txt", format: "text", template }]));
    expect(problems).toEqual([
      {
        path: "inputTemplates.0.template",
        message: 'a.txt, line 2: {% raw %} is never closed; end it with {% endraw %} (written without "-")',
      },
    ]);
    // nunjucks does not see an end tag written with "-" inside the block.
    expect(() => renderOne("text", "{% verbatim %}x{%- endverbatim %}", {})).toThrow(/never closed/);
  });

  it("are limited to 100 per template, since nunjucks copies the rest of the template for each", () => {
    const block = "{% raw %}x{% endraw %}\n";
    expect(renderOne("text", block.repeat(100), {})).toBe("x\n".repeat(100));
    expect(() => renderOne("text", block.repeat(101), {})).toThrow(
      /^input\.dat, line 101: a template may hold at most 100 \{% raw %\} or \{% verbatim %\} blocks/,
    );
  });
});

/**
 * The code preview renders one template at a time under an overall budget, with the same renderer (and
 * output) as a run's plan; the clock is injected so the budget is tested without slow templates.
 */
import { describe, expect, it } from "vitest";
import { renderCodeFiles } from "../../../server/execution/templates/render";
import { PREVIEW_RENDER_BUDGET_MS, renderWithinBudget } from "../../../server/services/code-preview.service";
import { codeDefinitionSchema } from "../../../shared/schemas/codes";

const definition = codeDefinitionSchema.parse({
  name: "budgeted",
  version: "1.0",
  executable: "/opt/codes/bin/budgeted",
  arguments: ["--steps={{ steps }}", "{% if verbose %}--verbose{% endif %}"],
  inputTemplates: [
    { fileName: "a.txt", format: "text", template: "steps {{ steps }}\n" },
    { fileName: "b.sh", format: "shell", template: "echo {{ label }}\n" },
    { fileName: "c.json", format: "json", template: '{"label": {{ label }}}\n' },
  ],
  parameters: { type: "object", properties: { steps: { type: "integer" }, label: { type: "string" } } },
});
const parameters = { steps: 3, label: "it's $HOME", verbose: false };

describe("rendering a code preview within its budget", () => {
  it("gives exactly what the run's renderer gives, file by file", () => {
    expect(renderWithinBudget(definition, parameters, null)).toEqual(
      renderCodeFiles(definition, parameters, null),
    );
  });

  it("stops before the next template once the budget is spent, naming it", () => {
    // Each reading advances 0.6 of the budget: the start reads 0.6, a.txt's check 1.2 (0.6 spent), b.sh's
    // 1.8 (1.2 spent: over).
    let clock = 0;
    const now = () => {
      clock += 0.6 * PREVIEW_RENDER_BUDGET_MS;
      return clock;
    };
    expect(() => renderWithinBudget(definition, parameters, null, now)).toThrow(
      /took longer than \d+ ms in all \(stopped before b\.sh\)/,
    );
  });

  it("reports a template error as a 422 naming the file and line", () => {
    const broken = {
      ...definition,
      inputTemplates: [{ fileName: "x.txt", format: "text" as const, template: "{{ nope }}" }],
    };
    try {
      renderWithinBudget(broken, parameters, null);
      expect.unreachable();
    } catch (error) {
      expect(error).toMatchObject({ status: 422, code: "template_failed" });
      expect((error as Error).message).toMatch(/^x\.txt, line 1: /);
    }
  });
});

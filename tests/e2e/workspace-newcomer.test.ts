/**
 * End to end in Chromium: the workspace as a newcomer of the demo group uses it. A group admin registers
 * the development host (in this process) for the group; a worker process runs beside the server
 * deploy/test.sh started. The researcher then works only in the browser: on the Targets page they choose an
 * XYZ file of a water-like molecule, make one hydrogen a deuteron and watch the derived panel follow
 * (centre of mass, rotational constants, point group), save the target and make an isotopologue of it; in
 * the composer they pick the target, the demo recipe orbitals-to-elastic and the host, type a parameter out
 * of range (the message appears beside that field and nothing is submitted), correct it, read the cost in
 * core-hours and submit; on the Runs page they filter by the target, find the run and open its live view.
 * Screenshots land in E2E_ARTIFACTS_DIR.
 */
import { randomBytes } from "node:crypto";
import type { Locator, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it, onTestFailed } from "vitest";
import { hfOrbitalsCode } from "../../deploy/demo/codes/psi4-orbitals";
import { radialScatterCode } from "../../deploy/demo/codes/radial-scatter";
import { DEMO_RECIPES } from "../../deploy/demo/science-scenario";
import { e2eEnv, screenshot } from "./support/browser";
import type { SessionApi } from "./support/session";
import { DEMO_GROUP_SLUG, openResearcherWorkspace, type ResearcherWorkspace } from "./support/workspace";

const env = e2eEnv();
const suffix = randomBytes(3).toString("hex");
const TARGET_NAME = `Aquilon ${suffix}`;
const ISOTOPOLOGUE_NAME = `Aquilon ${suffix} fully deuterated`;
const RUN_NAME = `Aquilon ${suffix} — elastic, first try`;
const WAIT = { timeout: 20_000, interval: 100 };

/**
 * A water-like geometry of our own (O–H 0.9578 Å, H–O–H 104.5°, in the yz plane, C2v), as a file of the
 * XYZ layout: atom count, a comment line, then element and x, y, z in Å.
 */
const ATOMS = [
  { symbol: "O", xyz: [0, 0, 0.1173] },
  { symbol: "H", xyz: [0, 0.7572, -0.4692] },
  { symbol: "H", xyz: [0, -0.7572, -0.4692] },
] as const;
const XYZ = `3\n${TARGET_NAME}\n${ATOMS.map((a) => `${a.symbol} ${a.xyz.join(" ")}`).join("\n")}\n`;

/**
 * Atomic masses in u, from memory of the AME2020 evaluation (Wang et al., Chinese Physics C 45, 030003
 * (2021)): ¹H 1.00782503, ²H 2.01410178, ¹⁶O 15.99491462. Used only for the centre of mass, a weighted mean.
 */
const MASS_U = { H1: 1.00782503, H2: 2.01410178, O16: 15.99491462 };

function centreOfMass(masses: number[]): number[] {
  const total = masses.reduce((sum, m) => sum + m, 0);
  return [0, 1, 2].map((k) => ATOMS.reduce((sum, atom, i) => sum + masses[i]! * atom.xyz[k]!, 0) / total);
}

let desk: ResearcherWorkspace | undefined;
let page: Page;
let api: SessionApi;
let groupId: string;
let hostId: string;
let runId: string | undefined;

beforeAll(async () => {
  desk = await openResearcherWorkspace(`newcomer-${suffix}`);
  ({ page, api, groupId, hostId } = desk);
  await ensureDemoRecipes(api, groupId);
});

afterAll(async () => {
  await desk?.close(runId);
});

/**
 * The demo recipes as deploy/start.sh seeds them (deploy/test.sh seeds only the people): the researcher
 * registers the two demo codes and recipes through the API unless the group has them already.
 */
async function ensureDemoRecipes(researcher: SessionApi, group: string): Promise<void> {
  const listed = await researcher("GET", `/api/groups/${group}/recipes`);
  expect(listed.status).toBe(200);
  const have = new Set((listed.body.recipes as { name: string }[]).map((r) => r.name));
  if (DEMO_RECIPES.every((recipe) => have.has(recipe.name))) return;
  const codeIds = new Map<string, string>();
  for (const definition of [hfOrbitalsCode, radialScatterCode]) {
    const created = await researcher("POST", `/api/groups/${group}/codes`, definition);
    if (created.status === 201) {
      codeIds.set(definition.name, created.body.id);
      continue;
    }
    const codes = await researcher("GET", `/api/groups/${group}/codes`);
    const found = (codes.body.codes as { id: string; name: string; version: string }[]).find(
      (c) => c.name === definition.name && c.version === definition.version,
    );
    expect(found, JSON.stringify(created.body)).toBeDefined();
    codeIds.set(definition.name, found!.id);
  }
  for (const recipe of DEMO_RECIPES.filter((r) => !have.has(r.name))) {
    const created = await researcher("POST", `/api/groups/${group}/recipes`, {
      name: recipe.name,
      description: recipe.description,
      stages: recipe.stages.map((stage) => ({ name: stage.name, codeId: codeIds.get(stage.code) })),
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
  }
}

/** The text of a value in the editor's derived panel, by the label above it. */
async function derived(p: Page, label: string): Promise<string> {
  const text = await p
    .locator('dl[aria-label="Derived properties"] dt', { hasText: label })
    .first()
    .locator("xpath=following-sibling::dd[1]")
    .textContent();
  return (text ?? "").replace("Recentre", "").trim();
}

const numbers = (text: string) => text.split(",").map((part) => Number(part.trim()));

/** The element a control's aria-describedby names that holds `text`, if any. */
async function describedByText(control: Locator): Promise<string> {
  const ids = ((await control.getAttribute("aria-describedby")) ?? "").split(/\s+/).filter(Boolean);
  const texts = await Promise.all(ids.map((id) => control.page().locator(`[id="${id}"]`).textContent()));
  return texts.join(" ");
}

describe("the workspace for a newcomer", () => {
  it("enters a target from an XYZ file, composes a run with a corrected error, and finds it", async () => {
    onTestFailed(() => {
      console.error(`worker log (warnings and worse):\n${desk?.worker.log() || "(empty)"}`);
    });
    expect(api.memberships.find((m) => m.groupSlug === DEMO_GROUP_SLUG)?.role).toBe("member");

    // --- Targets: an XYZ file into the editor, then one H made a deuteron. ---
    await page.goto(`${env.appUrl}/groups/${groupId}/targets`);
    const editor = page.getByRole("form", { name: "New target" });
    await editor.getByLabel("XYZ file", { exact: true }).setInputFiles({
      name: "aquilon.xyz",
      mimeType: "text/plain",
      buffer: Buffer.from(XYZ),
    });
    await expect
      .poll(() => editor.getByRole("status").textContent(), WAIT)
      .toBe("3 atoms read from aquilon.xyz.");
    expect(await editor.getByLabel("Name", { exact: true }).inputValue()).toBe(TARGET_NAME);
    expect(await editor.getByLabel("Atom 2 element").inputValue()).toBe("H");

    await expect.poll(() => derived(page, "Point group / Abelian subgroup"), WAIT).toBe("C2v / C2v");
    const comBefore = numbers(await derived(page, "Centre of mass (Å)"));
    const rotBefore = numbers(await derived(page, "Rotational constants A, B, C (cm⁻¹)"));
    const expectedBefore = centreOfMass([MASS_U.O16, MASS_U.H1, MASS_U.H1]);
    for (const [k, value] of comBefore.entries()) {
      expect(Math.abs(value - expectedBefore[k]!)).toBeLessThan(2e-6);
    }
    expect(rotBefore.every((value) => Number.isFinite(value) && value > 0)).toBe(true);

    await editor.getByLabel("Atom 2 isotope").selectOption("2");
    // One of the two equivalent hydrogens heavier: the C2 axis and one mirror plane are gone (Cs).
    await expect.poll(() => derived(page, "Point group / Abelian subgroup"), WAIT).toBe("Cs / Cs");
    const comAfter = numbers(await derived(page, "Centre of mass (Å)"));
    const rotAfter = numbers(await derived(page, "Rotational constants A, B, C (cm⁻¹)"));
    const expectedAfter = centreOfMass([MASS_U.O16, MASS_U.H2, MASS_U.H1]);
    for (const [k, value] of comAfter.entries()) {
      expect(Math.abs(value - expectedAfter[k]!)).toBeLessThan(2e-6);
    }
    expect(comAfter[1]).toBeGreaterThan(0.03); // towards the deuteron at y = +0.7572 Å
    // Adding mass Δm at p (from the old centre of mass) adds Δm·M/(M+Δm)·(|p|²1 − ppᵀ), positive
    // semidefinite, to the inertia tensor about the new centre: no principal moment falls (Weyl's
    // inequality) and the trace grows, so no rotational constant rises and their sum falls.
    for (const [k, value] of rotAfter.entries()) {
      expect(value).toBeLessThanOrEqual(rotBefore[k]! * (1 + 1e-6));
    }
    expect(rotAfter.reduce((a, b) => a + b)).toBeLessThan(rotBefore.reduce((a, b) => a + b) * 0.99);
    await page.getByRole("heading", { name: "New target" }).scrollIntoViewIfNeeded();
    await screenshot(page, "newcomer-target-editor");

    await editor.getByRole("button", { name: "Save target" }).click();
    await page.waitForURL(/\/targets\/[0-9a-f-]{36}$/);
    const targetId = new URL(page.url()).pathname.split("/").pop()!;
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent(), WAIT).toBe(TARGET_NAME);
    const saved = await api("GET", `/api/targets/${targetId}`);
    expect(saved.status).toBe(200);
    expect(saved.body.current.atoms.map((a: { massNumber: number | null }) => a.massNumber)).toEqual([
      null,
      2,
      null,
    ]);

    // --- An isotopologue: the form proposes H → D on every hydrogen; a name of our own. ---
    await page.getByRole("button", { name: "New isotopologue" }).click();
    const isoForm = page.getByRole("form", { name: "New isotopologue" });
    await isoForm.getByLabel("Name", { exact: true }).fill(ISOTOPOLOGUE_NAME);
    expect(await isoForm.getByLabel("Atom 3 (H) isotope").inputValue()).toBe("2");
    await isoForm.getByRole("button", { name: "Create isotopologue" }).click();
    const isoLink = page.getByRole("link", { name: ISOTOPOLOGUE_NAME });
    await expect.poll(() => isoLink.isVisible(), WAIT).toBe(true);
    // Both hydrogens deuterons again: the C2v symmetry is back.
    expect(await isoLink.locator("xpath=..").textContent()).toMatch(/C2v, version 1/);

    // --- The composer: target, recipe, host; a parameter out of range first. ---
    const runPosts: string[] = [];
    const runsPath = `/api/groups/${groupId}/runs`;
    page.on("request", (request) => {
      if (request.method() === "POST" && new URL(request.url()).pathname === runsPath) {
        runPosts.push(request.url());
      }
    });
    await page.goto(`${env.appUrl}/groups/${groupId}/runs`);
    await page.getByRole("link", { name: "New run" }).click();
    await page.waitForURL(/\/runs\/new$/);
    const composer = page.getByRole("form", { name: "New run" });
    await composer.getByLabel("Run name").fill(RUN_NAME);
    const targetSelect = composer.getByLabel("Target", { exact: true });
    await expect.poll(() => targetSelect.locator(`option[value="${targetId}"]`).count(), WAIT).toBe(1);
    await targetSelect.selectOption(targetId);
    const recipeSelect = composer.getByLabel("Recipe", { exact: true });
    const elastic = recipeSelect.locator("option", { hasText: /^orbitals-to-elastic / });
    await expect.poll(() => elastic.count(), WAIT).toBe(1);
    await recipeSelect.selectOption((await elastic.getAttribute("value"))!);
    const hostSelect = composer.getByLabel("Host", { exact: true });
    await expect.poll(() => hostSelect.locator(`option[value="${hostId}"]`).count(), WAIT).toBe(1);
    await hostSelect.selectOption(hostId);

    const polarizability = composer.getByLabel("Polarizability (bohr³)", { exact: true });
    await expect.poll(() => polarizability.count(), WAIT).toBe(1);
    // The schema allows 0 to 1000 bohr³; 2000 is out of range.
    await polarizability.fill("2000");
    await composer.getByLabel("Run name").click();
    await expect.poll(() => polarizability.getAttribute("aria-invalid"), WAIT).toBe("true");
    const message = await describedByText(polarizability);
    expect(message).toMatch(/At most 1000 bohr³\./);
    // The message sits in the same field as the input, under its label.
    const fieldBox = polarizability.locator("xpath=..");
    expect(await fieldBox.getByRole("alert").textContent()).toMatch(/1000/);
    // Submitting names the field again and sends nothing.
    const submitButton = composer.getByRole("button", { name: "Submit run" });
    await submitButton.click();
    await composer.evaluate((form: HTMLFormElement) => form.requestSubmit());
    await page.waitForTimeout(1_000);
    expect(runPosts).toEqual([]);
    await expect
      .poll(() => composer.getByRole("complementary", { name: "Before submitting" }).textContent(), WAIT)
      .toMatch(/Fill in the fields/);
    await polarizability.scrollIntoViewIfNeeded();
    await screenshot(page, "newcomer-composer-error", { fullPage: false });

    // Corrected: a water-like value (9.8 bohr³, as the demo's water run uses); the cost appears.
    await polarizability.fill("9.8");
    await expect.poll(() => polarizability.getAttribute("aria-invalid"), WAIT).toBeNull();
    const cost = composer.locator('dl[aria-label="Allocation cost"]');
    await expect.poll(() => cost.textContent().catch(() => ""), { timeout: 30_000 }).toMatch(/core-hours/);
    const costText = (await cost.textContent())!;
    const costMatch = /Cost([0-9.]+) core-hours \((\d+) cores? × (\d+) min\)/.exec(costText);
    expect(costMatch, costText).not.toBeNull();
    // Core-hours are cores × wall-time minutes / 60 (common practice for allocations).
    const [, hoursText, cores, minutes] = costMatch!;
    expect(Number(hoursText)).toBeCloseTo((Number(cores) * Number(minutes)) / 60, 3);
    await page.evaluate(() => window.scrollTo(0, 0));
    await screenshot(page, "newcomer-composer-cost", { fullPage: false });
    expect(runPosts).toEqual([]);

    await expect.poll(() => submitButton.isEnabled(), WAIT).toBe(true);
    await submitButton.click();
    await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    runId = new URL(page.url()).pathname.split("/").pop()!;
    expect(runPosts).toHaveLength(1);
    const stored = await api("GET", `/api/runs/${runId}`);
    expect(stored.status).toBe(200);
    expect(stored.body.name).toBe(RUN_NAME);

    // --- The runs table, filtered by the target through the address. ---
    await page.goto(`${env.appUrl}/groups/${groupId}/runs`);
    const filters = page.getByRole("region", { name: "Filters" });
    const targetFilter = filters.getByLabel("Target", { exact: true });
    await expect.poll(() => targetFilter.locator(`option[value="${targetId}"]`).count(), WAIT).toBe(1);
    await targetFilter.selectOption(targetId);
    await expect.poll(() => new URL(page.url()).searchParams.get("targetId"), WAIT).toBe(targetId);
    const table = page.getByRole("table", { name: /^Runs of / });
    await expect.poll(async () => (await table.locator("tbody tr").allInnerTexts()).length, WAIT).toBe(1);
    const runLink = table.getByRole("link", { name: RUN_NAME });
    expect(await runLink.isVisible()).toBe(true);
    await screenshot(page, "newcomer-runs-filtered");
    // The filter lives in the address: a reload keeps it.
    await page.reload();
    await expect.poll(() => page.getByRole("link", { name: RUN_NAME }).isVisible(), WAIT).toBe(true);
    expect(
      await page.getByRole("region", { name: "Filters" }).getByLabel("Target", { exact: true }).inputValue(),
    ).toBe(targetId);

    // --- The live view of the run. ---
    await page.getByRole("link", { name: RUN_NAME }).click();
    await page.waitForURL(new RegExp(`/runs/${runId}$`));
    await expect
      .poll(() => page.getByRole("heading", { level: 1, name: RUN_NAME }).isVisible(), WAIT)
      .toBe(true);
    await expect.poll(() => page.getByRole("status", { name: "Updates: live" }).isVisible(), WAIT).toBe(true);
    const state = () => page.getByText("State", { exact: true }).first().locator("xpath=..").textContent();
    await expect.poll(state, WAIT).toMatch(/queued|staging|submitted|running|collecting|held|done|failed/);
    // The page shows the state the server holds (polled together: the run moves on while we look).
    await expect
      .poll(async () => {
        const held = (await api("GET", `/api/runs/${runId}`)).body.state as string;
        return (await state())?.includes(held) ?? false;
      }, WAIT)
      .toBe(true);
    await screenshot(page, "newcomer-live-view");
  });

  it("enters a chosen XYZ file as it is through the upload route", async () => {
    const uploads: string[] = [];
    const onRequest = (request: { url(): string; method(): string }) => {
      if (request.method() === "POST" && /\/targets(\/upload)?$/.test(new URL(request.url()).pathname)) {
        uploads.push(new URL(request.url()).pathname);
      }
    };
    page.on("request", onRequest);
    try {
      await page.goto(`${env.appUrl}/groups/${groupId}/targets`);
      const editor = page.getByRole("form", { name: "New target" });
      await editor.getByLabel("XYZ file", { exact: true }).setInputFiles({
        name: "aquilon-as-is.xyz",
        mimeType: "text/plain",
        buffer: Buffer.from(XYZ.replace(TARGET_NAME, `${TARGET_NAME} as filed`)),
      });
      await expect
        .poll(() => editor.getByRole("status").textContent(), WAIT)
        .toBe("3 atoms read from aquilon-as-is.xyz.");
      await editor.getByRole("button", { name: "Save target" }).click();
      await page.waitForURL(/\/targets\/[0-9a-f-]{36}$/);
      expect(uploads).toEqual([`/api/groups/${groupId}/targets/upload`]);
      const id = new URL(page.url()).pathname.split("/").at(-1)!;
      // The server read the file itself: the atoms it stored are the file's, in its order.
      const stored = await api("GET", `/api/targets/${id}`);
      expect(stored.status).toBe(200);
      expect(stored.body.name).toBe(`${TARGET_NAME} as filed`);
      expect(stored.body.current.atoms.map((a: { symbol: string }) => a.symbol)).toEqual(["O", "H", "H"]);
    } finally {
      page.off("request", onRequest);
    }
  });
});

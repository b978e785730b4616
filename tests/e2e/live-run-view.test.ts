/**
 * End to end in Chromium: the live run view as a researcher of the demo group uses it. A group admin
 * registers the development host (in this process) for the group; a worker process runs beside the
 * server deploy/test.sh started. The researcher registers a small shell code whose output rules read
 * per-symmetry times and progress from its log, submits a run of it through the API, and watches the run
 * page: log lines arriving in the terminal, a row per finished symmetry, the remaining-time estimate
 * changing as symmetries finish. Then they cancel it and see `cancelled` on the run page and, without
 * reloading, in the runs list open in another tab. Screenshots land in E2E_ARTIFACTS_DIR.
 */
import { randomBytes } from "node:crypto";
import type { BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it, onTestFailed } from "vitest";
import { e2eEnv, screenshot } from "./support/browser";
import type { SessionApi } from "./support/session";
import { DEMO_GROUP_SLUG, openResearcherWorkspace, type ResearcherWorkspace } from "./support/workspace";

const env = e2eEnv();
const suffix = randomBytes(3).toString("hex");

/** Symmetries the code works through, each in `steps` lines 0.4 s apart (about 2.4–4 s each). */
const SYMMETRIES = [
  { name: "Ag", steps: 6 },
  { name: "B1g", steps: 9 },
  { name: "B2g", steps: 7 },
  { name: "B3g", steps: 10 },
  { name: "Au", steps: 8 },
  { name: "B1u", steps: 9 },
];
const STEP_SECONDS = 0.4;
/** How long a page may take to show what the test waits for (the machine may be busy). */
const WAIT = { timeout: 20_000, interval: 100 };

/**
 * The job: a progress line `0/6`, then per symmetry a line per step and, when it is done, its measured
 * wall time and the new progress; then a long tail so the run is still running when it is cancelled.
 */
const SCRIPT = [
  `echo "live view check: ${SYMMETRIES.length} symmetries, a line every ${STEP_SECONDS} s"`,
  `echo "progress 0/${SYMMETRIES.length} irreps"`,
  "n=0",
  `for pair in ${SYMMETRIES.map((s) => `${s.name}:${s.steps}`).join(" ")}; do`,
  '  sym=$(echo "$pair" | cut -d: -f1)',
  '  steps=$(echo "$pair" | cut -d: -f2)',
  "  start=$(date +%s%N)",
  "  i=1",
  '  while [ "$i" -le "$steps" ]; do',
  '    echo "symmetry $sym: step $i of $steps"',
  `    sleep ${STEP_SECONDS}`,
  "    i=$((i + 1))",
  "  done",
  "  end=$(date +%s%N)",
  "  n=$((n + 1))",
  `  echo "irrep $sym finished in $(awk -v s="$start" -v e="$end" 'BEGIN { printf "%.2f", (e - s) / 1e9 }') s"`,
  `  echo "progress $n/${SYMMETRIES.length} irreps"`,
  "done",
  "i=0",
  'while [ "$i" -lt 200 ]; do echo "assembling K-matrices: part $i"; sleep 0.4; i=$((i + 1)); done',
  "",
].join("\n");

const CODE = {
  name: `live-view-check-${suffix}`,
  version: "1.0",
  description: "Prints per-symmetry progress slowly, for the end-to-end check of the live run view.",
  executable: "/bin/sh",
  arguments: ["run.sh"],
  inputTemplates: [{ fileName: "run.sh", format: "text", template: SCRIPT }],
  parameters: { type: "object", properties: {}, additionalProperties: false },
  outputRules: {
    progress: ["^progress (?<done>[0-9]+)/(?<total>[0-9]+) irreps$"],
    timings: ["^irrep (?<symmetry>\\S+) finished in (?<seconds>[0-9.]+) s$"],
  },
  defaults: { cores: 1, wallTimeMinutes: 5 },
};

let desk: ResearcherWorkspace | undefined;
let context: BrowserContext;
let page: Page;
let api: SessionApi;
let groupId: string;
let hostId: string;
let runId: string | undefined;

beforeAll(async () => {
  desk = await openResearcherWorkspace(`live-view-${suffix}`);
  ({ context, page, api, groupId, hostId } = desk);
});

afterAll(async () => {
  await desk?.close(runId);
});

/** The rows the terminal shows now (xterm's DOM renderer draws the rows on screen as text). */
const terminalText = (p: Page) => p.locator('[data-testid="live-log"] .xterm-rows').textContent();

/**
 * Where the newest step line in `text` is in the job's order (symmetry index × 100 + step), −1 for none.
 * The terminal's rows come without line breaks between them; each line starts with its own words.
 */
function latestStep(text: string | null): number {
  let latest = -1;
  for (const match of (text ?? "").matchAll(/symmetry (\S+): step (\d+) of/g)) {
    const index = SYMMETRIES.findIndex((s) => s.name === match[1]);
    if (index >= 0) latest = Math.max(latest, index * 100 + Number(match[2]));
  }
  return latest;
}

const timingsTable = (p: Page) => p.getByRole("table", { name: "Time per symmetry" });

async function timingRows(p: Page): Promise<{ symmetry: string; seconds: number }[]> {
  const rows = await timingsTable(p).locator("tbody tr").all();
  const out: { symmetry: string; seconds: number }[] = [];
  for (const row of rows) {
    const cells = await row.locator("td").allInnerTexts();
    out.push({ symmetry: cells[1]!.trim(), seconds: Number(cells[2]) });
  }
  return out;
}

/** The state in the run's summary card (the first "State" label on the page; History comes later). */
const summaryState = (p: Page) =>
  p.getByText("State", { exact: true }).first().locator("xpath=..").textContent();

describe("live run view", () => {
  it("streams the log, timings and estimate of a running run, and shows it cancelled", async () => {
    onTestFailed(() => {
      console.error(`worker log (warnings and worse):\n${desk?.worker.log() || "(empty)"}`);
    });
    expect(api.memberships.find((m) => m.groupSlug === DEMO_GROUP_SLUG)?.role).toBe("member");

    // The researcher registers the code and a one-stage recipe, and submits a run through the API.
    const code = await api("POST", `/api/groups/${groupId}/codes`, CODE);
    expect(code.status, JSON.stringify(code.body)).toBe(201);
    const recipe = await api("POST", `/api/groups/${groupId}/recipes`, {
      name: `live-view-check-${suffix}`,
      stages: [{ name: "scatter", codeId: code.body.id }],
    });
    expect(recipe.status, JSON.stringify(recipe.body)).toBe(201);
    const runName = `Live view check ${suffix}`;
    const created = await api("POST", `/api/groups/${groupId}/runs`, {
      spec: {
        name: runName,
        recipeId: recipe.body.id,
        hostId,
        parameters: {},
        resources: { cores: 1, wallTimeMinutes: 5 },
      },
      onDuplicate: "run",
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    runId = created.body.id as string;

    // The runs list in a second tab, marked so a reload would show.
    const list = await context.newPage();
    list.setDefaultTimeout(15_000);
    await list.goto(`${env.appUrl}/groups/${groupId}/runs`);
    await list.evaluate(() => {
      (window as unknown as { sfNotReloaded: boolean }).sfNotReloaded = true;
    });
    const listRow = list.getByRole("row").filter({ has: list.getByRole("link", { name: runName }) });
    await expect.poll(() => list.getByRole("status", { name: "Updates: live" }).isVisible(), WAIT).toBe(true);

    await page.goto(`${env.appUrl}/groups/${groupId}/runs/${runId}`);
    await expect
      .poll(() => page.getByRole("status", { name: "Updates: live" }).isVisible(), { timeout: 20_000 })
      .toBe(true);
    await expect
      .poll(() => summaryState(page), {
        timeout: 45_000,
        message: "the run reaches running",
      })
      .toMatch(/running/);

    // Log lines arrive in the terminal, and keep arriving. xterm draws only while the terminal is in
    // view, so the researcher scrolls down to it first.
    await page.getByTestId("live-log").scrollIntoViewIfNeeded();
    await expect.poll(async () => latestStep(await terminalText(page)), WAIT).toBeGreaterThanOrEqual(0);
    const firstSeen = latestStep(await terminalText(page));
    await expect
      .poll(async () => latestStep(await terminalText(page)), { timeout: 30_000, interval: 100 })
      .toBeGreaterThanOrEqual(firstSeen + 3);
    // It keeps up with the stored log: what the log held a moment ago is on screen within seconds.
    const storedLatest = latestStep((await api("GET", `/api/runs/${runId}/log/raw`)).body);
    expect(storedLatest).toBeGreaterThanOrEqual(0);
    await expect
      .poll(async () => latestStep(await terminalText(page)), { timeout: 10_000, interval: 100 })
      .toBeGreaterThanOrEqual(storedLatest);

    await expect.poll(() => listRow.textContent(), WAIT).toMatch(/running/);

    // A row per finished symmetry, with the time the job measured (6 steps of 0.4 s: at least 2.4 s).
    await expect
      .poll(async () => (await timingRows(page)).map((row) => row.symmetry), { timeout: 30_000 })
      .toContain("Ag");
    const ag = (await timingRows(page)).find((row) => row.symmetry === "Ag")!;
    expect(ag.seconds).toBeGreaterThanOrEqual(6 * STEP_SECONDS);
    expect(ag.seconds).toBeLessThan(30);

    // The estimate changes as symmetries finish: fewer symmetries left, each time about mean × left.
    const estimates = new Map<number, string>();
    await expect
      .poll(
        async () => {
          const text = await page
            .getByTestId("remaining-time")
            .textContent()
            .catch(() => null);
          const match = /about (.+) left — (\d+) symmetr(?:y|ies) at ([0-9.]+) s each/.exec(text ?? "");
          if (match) estimates.set(Number(match[2]), match.input);
          return estimates.size;
        },
        { timeout: 40_000, interval: 200 },
      )
      .toBeGreaterThanOrEqual(2);
    for (const [left, text] of estimates) {
      expect(text).toMatch(/^Stage scatter: about /);
      expect(left).toBeLessThan(SYMMETRIES.length);
      const mean = Number(/at ([0-9.]+) s each/.exec(text)![1]);
      const shown = /about (\d+) s left/.exec(text);
      // Estimates under a minute are whole seconds: mean × left, rounded (mean shown to 0.1 s).
      if (shown) expect(Math.abs(Number(shown[1]) - mean * left)).toBeLessThanOrEqual(left * 0.05 + 1);
    }
    expect((await timingRows(page)).length).toBeGreaterThanOrEqual(2);
    // What the researcher sees while it streams: the timings, the estimate and the log below them.
    await page.getByRole("heading", { name: "Time per symmetry" }).evaluate((heading) => {
      heading.scrollIntoView({ block: "start" });
      window.scrollBy(0, -80);
    });
    await screenshot(page, "live-run-streaming", { fullPage: false });

    // Cancel, confirm in the page's dialog, and see it acknowledged, then `cancelled`.
    await page.getByRole("button", { name: "Cancel", exact: true }).click();
    await page.getByRole("dialog").getByRole("button", { name: "Cancel run", exact: true }).click();
    await expect
      .poll(() => summaryState(page), {
        timeout: 30_000,
        message: "the run becomes cancelled",
      })
      .toMatch(/cancelled/);
    await expect
      .poll(() => page.getByRole("button", { name: "Resubmit", exact: true }).isVisible(), WAIT)
      .toBe(true);
    expect(await page.getByTestId("remaining-time").count()).toBe(0);
    const history = page.getByRole("table", { name: "State changes" });
    await expect.poll(() => history.textContent(), WAIT).toMatch(/cancelled/);
    await page.evaluate(() => window.scrollTo(0, 0));
    await screenshot(page, "live-run-cancelled");

    // The runs list followed without a reload.
    await expect.poll(() => listRow.textContent(), { timeout: 20_000 }).toMatch(/cancelled/);
    expect(await list.evaluate(() => (window as unknown as { sfNotReloaded?: boolean }).sfNotReloaded)).toBe(
      true,
    );
    await screenshot(list, "live-runs-list-cancelled");

    const stored = await api("GET", `/api/runs/${runId}`);
    expect(stored.body.state).toBe("cancelled");
  });
});

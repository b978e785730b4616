/**
 * The browser's live client (src/features/live/live-client.ts) with the log terminal's flow control
 * (src/features/live/log-flow.ts) against the real live feed and a real run. Checked against the stored
 * log itself (GET /api/runs/:id/log/raw): with a small send budget (the server pauses the feed often), a
 * slow terminal (chunks held back above the watermark) and a connection cut in the middle (the client
 * re-joins with its last sequence number), every chunk arrives once and in order and the bytes equal the
 * raw log.
 */
import { io } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LIVE_PATH } from "../../shared/schemas/live";
import { runLogSchema } from "../../shared/schemas/runs";
import { LiveClient } from "../../src/features/live/live-client";
import { LogFlow } from "../../src/features/live/log-flow";
import { shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  registerRecipe,
  runSpec,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import { tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { waitFor } from "./support/wait-for";

const LINES = 60;
/** Multi-byte UTF-8 and ANSI colour in every line: the feed carries bytes, not text. */
const SCRIPT = [
  "i=1",
  `while [ "$i" -le ${LINES} ]; do`,
  `  printf 'line %03d of ${LINES} caf\\303\\251 \\033[1mbold\\033[0m\\n' "$i"`,
  "  sleep 0.05",
  "  i=$((i + 1))",
  "done",
].join("\n");

let scenario: EngineScenario;
let token = "";
let runId = "";

beforeAll(async () => {
  scenario = await startEngineScenario("live_browser_client");
  const recipeId = await registerRecipe(scenario.sf, "numbered-lines", [
    { name: "count", code: shellCode({ script: SCRIPT }) },
  ]);
  token = await tokenFor(scenario.database.db, scenario.sf.researcher);
  const created = await scenario.sf.api(
    "POST",
    `/api/groups/${scenario.sf.groupId}/runs`,
    runSpec(recipeId, scenario.hostId, { count: {} }, "numbered lines"),
  );
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  runId = created.body.id;
  await waitForState(scenario.sf, runId, ["done"], 40_000);
}, 90_000);

afterAll(async () => {
  await scenario?.close();
});

describe("the browser's live client against the live feed", () => {
  it("gets every chunk once and in order through pauses, a slow terminal and a cut connection", async () => {
    const app = await startTestApp(scenario.database, { live: { sendBudgetBytes: 600 } });
    const socket = io(app.baseUrl, {
      path: LIVE_PATH,
      auth: { token },
      reconnectionDelay: 50,
      reconnectionDelayMax: 100,
    });
    const client = new LiveClient(socket);
    const statuses: string[] = [];
    client.onStatus((status) => statuses.push(status));
    try {
      const headers = { authorization: `Bearer ${token}` };
      const stored = await fetch(`${app.baseUrl}/api/runs/${runId}/log?limit=2000`, { headers });
      expect(stored.status).toBe(200);
      const last = runLogSchema.parse(await stored.json()).lastSeq;
      expect(last).toBeGreaterThan(3);
      const raw = await fetch(`${app.baseUrl}/api/runs/${runId}/log/raw`, { headers });
      const rawBytes = Buffer.from(await raw.arrayBuffer());

      const seqs: number[] = [];
      const written: Buffer[] = [];
      let pauses = 0;
      let resumes = 0;
      let cut = false;
      // A terminal that takes 5 ms per piece, with watermarks small enough that chunks wait.
      const terminal = {
        write(data: Uint8Array, done: () => void) {
          written.push(Buffer.from(data));
          setTimeout(done, 5);
        },
      };
      const holder: { resume?: () => void } = {};
      const flow = new LogFlow(
        terminal,
        () => {
          resumes += 1;
          holder.resume?.();
        },
        { highBytes: 300, lowBytes: 100 },
      );
      const handle = client.followLog(runId, {
        onChunk(chunk, ack) {
          seqs.push(chunk.seq);
          flow.accept(chunk.data, ack);
          if (!cut && seqs.length === 2) {
            cut = true;
            // Ends the transport as a network failure would; socket.io reconnects by itself.
            socket.io.engine.close();
          }
        },
        onPaused() {
          pauses += 1;
          flow.paused();
        },
      });
      holder.resume = handle.resume;

      await waitFor(
        "every stored chunk written",
        () => Buffer.concat(written).length,
        (length) => length === rawBytes.length,
        { timeoutMs: 20_000, context: () => JSON.stringify({ seqs, pauses, resumes, last }) },
      );
      expect(cut).toBe(true);
      expect(statuses).toEqual(["live", "reconnecting", "live"]);
      expect(seqs).toEqual(Array.from({ length: last }, (_, i) => i + 1));
      expect(handle.lastSeq()).toBe(last);
      expect(Buffer.concat(written).equals(rawBytes)).toBe(true);
      // A 600-byte budget over the whole log: the server paused the feed, and the client resumed it.
      expect(pauses).toBeGreaterThan(0);
      expect(resumes).toBeGreaterThan(0);
    } finally {
      client.close();
      await app.close();
    }
  }, 40_000);
});

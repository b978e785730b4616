/**
 * The live run page against a fake live feed (support/fake-socket.ts stands in for socket.io-client;
 * contract: shared/schemas/live.ts) and a fake terminal (jsdom cannot render xterm): joins ask for the
 * chunks after the last one held, a reconnect neither loses nor repeats a chunk, state events update the
 * badge and the history, timings and the remaining-time estimate follow progress events, a paused feed is
 * resumed only once the terminal has caught up, and cancelling from the live view shows the new state.
 */
import type { Code, Recipe } from "@shared/schemas";
import type { LiveRunState } from "@shared/schemas/live";
import type { RunDetail } from "@shared/schemas/runs";
import { act, screen, waitFor, within } from "@testing-library/react";
import { HttpResponse, http } from "msw";
import { afterEach, describe, expect, it, vi } from "vitest";
import { closeLiveClient } from "@/features/live/load-live";
import { installFakeApi } from "./support/fake-api";
import { type FakeSocket, fakeSockets } from "./support/fake-socket";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";
import { server } from "./support/server";

type FakeTerminal = {
  text: string;
  /** Write callbacks not yet run (when the terminal is told to hold them). */
  held: (() => void)[];
  follow: boolean;
  flush: () => void;
};

const terminals = vi.hoisted(() => ({ list: [] as FakeTerminal[], holdCallbacks: false }));

vi.mock("@/features/live/terminal/xterm-terminal", () => ({
  createLogTerminal(container: HTMLElement) {
    const decoder = new TextDecoder();
    const terminal = {
      text: "",
      held: [] as (() => void)[],
      follow: true,
      write(data: Uint8Array, written: () => void) {
        terminal.text += decoder.decode(data, { stream: true });
        container.textContent = terminal.text;
        if (terminals.holdCallbacks) terminal.held.push(written);
        else queueMicrotask(written);
      },
      setFollow(on: boolean) {
        terminal.follow = on;
      },
      find: (term: string) => terminal.text.includes(term),
      clearSearch() {},
      dispose() {},
      flush() {
        for (const written of terminal.held.splice(0)) written();
      },
    };
    terminals.list.push(terminal);
    return terminal;
  },
}));

afterEach(async () => {
  await closeLiveClient();
  fakeSockets.length = 0;
  terminals.list.length = 0;
  terminals.holdCallbacks = false;
});

const runPath = (runId: string) => `/groups/${KESTREL_ID}/runs/${runId}`;
const bytes = (text: string) => new TextEncoder().encode(text);
const at = (second: number) =>
  `2026-11-30T10:0${Math.floor(second / 60)}:${String(second % 60).padStart(2, "0")}.000Z`;

function chunk(seq: number, data: Uint8Array, runId = RUN_IDS.running) {
  return {
    runId,
    seq,
    offsetBytes: 0,
    data: data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength),
    at: at(seq),
  };
}

/** The fixture runs' recipe: an orbitals stage that reports no per-symmetry times, then two that do. */
const RECIPE_ID = "5a1e0000-0000-4000-8000-0000000000aa";
const codeOf = (id: string, name: string, timings: string[]): Code => ({
  id,
  groupId: KESTREL_ID,
  createdAt: "2026-11-01T09:00:00.000Z",
  definition: {
    name,
    version: "1.0",
    description: "",
    executable: "/usr/bin/true",
    arguments: [],
    setupLines: [],
    inputTemplates: [],
    parameters: { type: "object" },
    outputFiles: [],
    outputRules: { progress: ["^progress (?<done>[0-9]+)/(?<total>[0-9]+)$"], timings },
    resultFiles: [],
    defaults: { cores: 1, wallTimeMinutes: 60 },
  },
});
const codes = [
  codeOf("c0de0000-0000-4000-8000-000000000001", "orbitals", []),
  codeOf("c0de0000-0000-4000-8000-000000000002", "regions", [
    "^symmetry (?<symmetry>\\S+) took (?<seconds>[0-9.]+) s$",
  ]),
];
const recipe: Recipe = {
  id: RECIPE_ID,
  groupId: KESTREL_ID,
  name: "regions",
  description: "",
  stages: [
    { name: "orbitals", codeId: codes[0]!.id, codeName: "orbitals", codeVersion: "1.0" },
    { name: "inner", codeId: codes[1]!.id, codeName: "regions", codeVersion: "1.0" },
    { name: "outer", codeId: codes[1]!.id, codeName: "regions", codeVersion: "1.0" },
  ],
  createdAt: "2026-11-01T09:00:00.000Z",
};

/** Codes the page has been sent, so a test knows the page has learnt which stages time symmetries. */
const codesSent: string[] = [];

function setUp(runs: RunDetail[] = kestrelRuns()) {
  codesSent.length = 0;
  const api = installFakeApi({
    me: people.tomas,
    groups: [{ ...kestrel, myRole: "member" }],
    runs: { [KESTREL_ID]: runs },
  });
  server.use(
    http.get(`/api/recipes/${RECIPE_ID}`, () => HttpResponse.json(recipe)),
    http.get("/api/codes/:codeId", ({ params }) => {
      const code = codes.find((candidate) => candidate.id === params.codeId);
      if (!code) return HttpResponse.json({ error: "no such code" }, { status: 404 });
      codesSent.push(code.id);
      return HttpResponse.json(code);
    }),
  );
  const view = renderApp(runPath(RUN_IDS.running));
  return { api, ...view };
}

async function connected(): Promise<FakeSocket> {
  await waitFor(() => expect(fakeSockets).toHaveLength(1));
  const socket = fakeSockets[0]!;
  act(() => socket.serverConnect());
  return socket;
}

/** Answers every join so far that has not been answered, as the server does once access is checked. */
function ackJoins(socket: FakeSocket) {
  for (const sent of socket.emitted) {
    if (sent.ack && !(sent as { answered?: boolean }).answered) {
      (sent as { answered?: boolean }).answered = true;
      sent.ack({ ok: true });
    }
  }
}

async function terminalShown(): Promise<FakeTerminal> {
  await waitFor(() => expect(terminals.list).toHaveLength(1));
  return terminals.list[0]!;
}

describe("the live run page", () => {
  it("asks again when the server is busy, and shows a refusal only when it is final", async () => {
    setUp();
    const socket = await connected();
    await terminalShown();
    const logJoins = () => socket.sent("run:join").filter((sent) => (sent.payload as { log: boolean }).log);
    await waitFor(() => expect(logJoins()).toHaveLength(1));
    act(() => logJoins()[0]!.ack?.({ ok: false, error: { code: "busy", message: "The server is busy." } }));
    // About a second later the same join goes again, from the same place in the log.
    await waitFor(() => expect(logJoins()).toHaveLength(2), { timeout: 3_000 });
    expect(logJoins()[1]!.payload).toEqual({ runId: RUN_IDS.running, afterSeq: 0, log: true });
    expect(screen.queryByText("The server is busy.")).toBeNull();
    // A final answer (no access) is shown, and not asked again.
    act(() => logJoins()[1]!.ack?.({ ok: false, error: { code: "not_found", message: "Run not found." } }));
    expect(await screen.findByText(/Run not found\./)).toBeInTheDocument();
    await new Promise((resolve) => setTimeout(resolve, 1_500));
    expect(logJoins()).toHaveLength(2);
  });

  it("joins with the last sequence number held, and a reconnect neither loses nor repeats a chunk", async () => {
    setUp();
    const socket = await connected();
    expect(socket.options).toMatchObject({ path: "/api/live", withCredentials: true });
    await screen.findByRole("heading", { name: "HNCO cc-pVDZ inner region" });
    const terminal = await terminalShown();
    // A fresh terminal holds nothing: it asks for the log from the start.
    await waitFor(() =>
      expect(socket.sent("run:join").map((sent) => sent.payload)).toContainEqual({
        runId: RUN_IDS.running,
        afterSeq: 0,
        log: true,
      }),
    );
    ackJoins(socket);

    const acks: number[] = [];
    act(() => {
      socket.serverEmit("run:log", chunk(1, bytes("stage outer: start\n")), () => acks.push(1));
      socket.serverEmit("run:log", chunk(2, bytes("irrep A1 finished in 10.0 s\n")), () => acks.push(2));
    });
    await waitFor(() => expect(terminal.text).toBe("stage outer: start\nirrep A1 finished in 10.0 s\n"));
    await waitFor(() => expect(acks).toEqual([1, 2]));
    expect(screen.getByTestId("live-log")).toHaveTextContent("irrep A1 finished in 10.0 s");

    act(() => socket.serverDisconnect());
    expect(await screen.findByRole("status", { name: "Updates: reconnecting…" })).toBeInTheDocument();
    const joinsBefore = socket.sent("run:join").length;
    act(() => socket.serverConnect());
    await waitFor(() => expect(socket.sent("run:join").length).toBeGreaterThan(joinsBefore));
    expect(socket.sent("run:join").at(-1)?.payload).toEqual({
      runId: RUN_IDS.running,
      afterSeq: 2,
      log: true,
    });
    expect(await screen.findByRole("status", { name: "Updates: live" })).toBeInTheDocument();

    // The server's replay overlaps what the page holds (seq 2): that chunk is dropped, seq 3 is shown.
    act(() => {
      socket.serverEmit("run:log", chunk(2, bytes("irrep A1 finished in 10.0 s\n")), () => acks.push(2));
      socket.serverEmit("run:log", chunk(3, bytes("irrep B1 finished in 20.0 s\n")), () => acks.push(3));
    });
    await waitFor(() =>
      expect(terminal.text).toBe(
        "stage outer: start\nirrep A1 finished in 10.0 s\nirrep B1 finished in 20.0 s\n",
      ),
    );
    // The duplicate is still acknowledged, so the server's send budget is not held by it.
    await waitFor(() => expect(acks).toEqual([1, 2, 2, 3]));
  });

  it("decodes a character cut between two chunks whole (the terminal gets the bytes as sent)", async () => {
    setUp();
    const socket = await connected();
    const terminal = await terminalShown();
    const text = bytes("énergie 😀\n");
    // "é" is C3 A9: cut after C3.
    act(() => {
      socket.serverEmit("run:log", chunk(1, text.subarray(0, 1)));
      socket.serverEmit("run:log", chunk(2, text.subarray(1)));
    });
    await waitFor(() => expect(terminal.text).toBe("énergie 😀\n"));
  });

  it("shows the stored log until the feed connects, then the terminal with following and search", async () => {
    const { user } = setUp();
    await waitFor(() => expect(screen.getByTestId("run-log")).toHaveTextContent("No output yet."));
    const socket = await connected();
    const terminal = await terminalShown();
    await waitFor(() => expect(screen.queryByTestId("run-log")).not.toBeInTheDocument());
    expect(screen.getByRole("log", { name: "Run log" })).toBeVisible();
    act(() => socket.serverEmit("run:log", chunk(1, bytes("irrep B2 finished in 90.0 s\n"))));
    await waitFor(() => expect(terminal.text).toContain("B2"));

    await user.click(screen.getByRole("button", { name: "Pause following" }));
    expect(terminal.follow).toBe(false);
    expect(screen.getByRole("button", { name: "Follow the log" })).toHaveAttribute("aria-pressed", "false");
    await user.click(screen.getByRole("button", { name: "Follow the log" }));
    expect(terminal.follow).toBe(true);

    const search = screen.getByRole("searchbox", { name: "Text to find in the log" });
    await user.type(search, "A1{Enter}");
    expect(await screen.findByText("No “A1” in the log so far.")).toBeInTheDocument();
    await user.clear(search);
    await user.type(search, "B2{Enter}");
    expect(screen.queryByText(/in the log so far/)).not.toBeInTheDocument();
    expect(screen.getByRole("link", { name: "Download the whole log" })).toHaveAttribute(
      "href",
      expect.stringMatching(new RegExp(`/api/runs/${RUN_IDS.running}/log/raw$`)),
    );
  });

  it("shows a state event in the badge and the history at once, and cancelling from the live view follows the feed", async () => {
    const { api, user } = setUp();
    const socket = await connected();
    await screen.findByRole("heading", { name: "HNCO cc-pVDZ inner region" });
    await user.click(screen.getByRole("button", { name: "Cancel" }));
    await user.click(within(await screen.findByRole("dialog")).getByRole("button", { name: "Cancel run" }));
    expect(await screen.findByRole("button", { name: "Cancelling…" })).toBeDisabled();
    expect(
      api.requests.some((r) => r.method === "POST" && r.path === `/api/runs/${RUN_IDS.running}/cancel`),
    ).toBe(true);

    // The server's state after the scheduler confirmed the cancellation, and its event.
    const event: LiveRunState = {
      runId: RUN_IDS.running,
      state: "cancelled",
      message: "Cancelled by Tomás Brandt",
      at: "2026-11-30T10:05:00.000Z",
    };
    const stored = api.state.runs[KESTREL_ID]!.find((run) => run.id === RUN_IDS.running) as RunDetail;
    stored.state = "cancelled";
    stored.stateMessage = event.message;
    stored.events.push({
      at: event.at,
      fromState: "running",
      toState: "cancelled",
      actor: "user",
      actorName: "Tomás Brandt",
      message: event.message,
    });
    act(() => socket.serverEmit("run:state", event));

    const history = await screen.findByRole("table", { name: "State changes" });
    const row = await within(history).findByRole("row", { name: /Cancelled by Tomás Brandt/ });
    expect(within(row).getByText("cancelled")).toBeInTheDocument();
    await waitFor(() => expect(screen.getAllByText("cancelled").length).toBeGreaterThanOrEqual(2));
    // A cancelled run offers resubmission instead.
    expect(await screen.findByRole("button", { name: "Resubmit" })).toBeInTheDocument();
  });

  it("says nothing about symmetry times while the run is in a stage that reports none", async () => {
    const runs = kestrelRuns().map((run) =>
      run.id === RUN_IDS.running
        ? {
            ...run,
            timings: [],
            progress: { stage: "orbitals", stageIndex: 1, stageCount: 3, done: 1, total: 2, percent: 50 },
          }
        : run,
    );
    setUp(runs);
    const socket = await connected();
    await screen.findByRole("heading", { name: "HNCO cc-pVDZ inner region" });
    // The orbitals stage's code has no timing rules: no table, no estimate.
    await waitFor(() => expect(codesSent).toHaveLength(3));
    await act(() => new Promise((resolve) => setTimeout(resolve, 100)));
    expect(screen.queryByRole("heading", { name: "Time per symmetry" })).toBeNull();
    expect(screen.queryByTestId("remaining-time")).toBeNull();
    // The next stage does time its symmetries: the estimate appears once the run is in it.
    act(() =>
      socket.serverEmit("run:progress", {
        runId: RUN_IDS.running,
        progress: { stage: "inner", stageIndex: 2, stageCount: 3, done: 0, total: 4, percent: 0 },
        timings: [],
      }),
    );
    expect(await screen.findByTestId("remaining-time")).toHaveTextContent(
      "Stage inner: estimate after the first symmetry.",
    );
    expect(screen.getByRole("heading", { name: "Time per symmetry" })).toBeInTheDocument();
  });

  it("updates the timings and the remaining-time estimate as progress events arrive", async () => {
    setUp();
    const socket = await connected();
    // The fixture is in stage "outer" (3 of 12) with timings of stage "inner" only.
    expect(await screen.findByTestId("remaining-time")).toHaveTextContent(
      "Stage outer: estimate after the first symmetry.",
    );
    const progress = (done: number) => ({
      stage: "outer",
      stageIndex: 2,
      stageCount: 3,
      done,
      total: 4,
      percent: (done / 4) * 100,
    });
    const inner = { stage: "inner", symmetry: "A'", durationSeconds: 41.5 };
    act(() =>
      socket.serverEmit("run:progress", {
        runId: RUN_IDS.running,
        progress: progress(2),
        timings: [
          inner,
          { stage: "outer", symmetry: "A1", durationSeconds: 10 },
          { stage: "outer", symmetry: "B1", durationSeconds: 20 },
        ],
      }),
    );
    // Mean of the done symmetries (10 s, 20 s) = 15 s, times the 2 of 4 left = 30 s (arithmetic).
    await waitFor(() =>
      expect(screen.getByTestId("remaining-time")).toHaveTextContent(
        "about 30 s left — 2 symmetries at 15.0 s each",
      ),
    );
    const table = screen.getByRole("table", { name: "Time per symmetry" });
    expect(within(table).getByRole("row", { name: /outer B1 20.00/ })).toBeInTheDocument();

    act(() =>
      socket.serverEmit("run:progress", {
        runId: RUN_IDS.running,
        progress: progress(3),
        timings: [
          inner,
          { stage: "outer", symmetry: "A1", durationSeconds: 10 },
          { stage: "outer", symmetry: "B1", durationSeconds: 20 },
          { stage: "outer", symmetry: "B2", durationSeconds: 90 },
        ],
      }),
    );
    // (10 + 20 + 90) / 3 = 40 s, times the 1 left = 40 s.
    await waitFor(() =>
      expect(screen.getByTestId("remaining-time")).toHaveTextContent(
        "about 40 s left — 1 symmetry at 40.0 s each",
      ),
    );
    expect(
      within(screen.getByRole("table", { name: "Time per symmetry" })).getByRole("row", {
        name: /outer B2 90.00/,
      }),
    ).toBeInTheDocument();
    expect(screen.getByText("Stage 2 of 3: outer, 75 % (3 of 4)")).toBeInTheDocument();
  });

  it("answers run:paused with run:resume only once the terminal has caught up", async () => {
    setUp();
    const socket = await connected();
    const terminal = await terminalShown();
    terminals.holdCallbacks = true;
    const acks: number[] = [];
    // Three chunks of 300 kB: past the 500 kB high watermark the third waits, unacknowledged.
    const big = (fill: number) => new Uint8Array(300_000).fill(fill);
    act(() => {
      for (const seq of [1, 2, 3])
        socket.serverEmit("run:log", chunk(seq, big(0x60 + seq)), () => acks.push(seq));
      socket.serverEmit("run:paused", { runId: RUN_IDS.running, lastSentSeq: 3 });
    });
    expect(terminal.held).toHaveLength(2);
    expect(terminal.text.length).toBe(600_000);
    expect(acks).toEqual([]);
    expect(socket.sent("run:resume")).toEqual([]);

    // The terminal processes the first two; the third is written and the feed resumed after the last seq.
    act(() => terminal.flush());
    expect(acks).toEqual([1, 2]);
    expect(terminal.text.length).toBe(900_000);
    expect(socket.sent("run:resume").map((sent) => sent.payload)).toEqual([
      { runId: RUN_IDS.running, afterSeq: 3, log: true },
    ]);
    act(() => terminal.flush());
    expect(acks).toEqual([1, 2, 3]);
  });
});

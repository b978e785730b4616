/**
 * The live feed's reads of the stored log: feeds of one process at the same place in the same run share
 * one read, a log notice makes later readers read anew, and a feed whose read failed tries again by
 * itself (nothing else may wake it once its run's last chunk is stored).
 */
import { afterEach, describe, expect, it, vi } from "vitest";
import type { Database } from "../../../server/db/client";
import type { Logger } from "../../../server/logger";
import { READ_RETRY_MS, RunLogFeed, SendBudget, SharedLogReads } from "../../../server/realtime/log-feed";

type Row = { seq: number; offsetBytes: number; content: Buffer; at: Date };

/**
 * A database whose log pages resolve when the test says so. A page is two queries (readRunLogPage): the
 * chunks' sizes (select…orderBy…limit), which the test resolves with the page's rows, then the chosen
 * chunks' bytes (select…orderBy, awaited), which get those rows.
 */
function fakeDatabase() {
  const queries: { resolve: (rows: Row[]) => void; reject: (error: Error) => void }[] = [];
  const resolvedPages: Row[][] = [];
  const page = {
    limit: () =>
      new Promise<{ seq: number; sizeBytes: number }[]>((resolve, reject) => {
        queries.push({
          resolve: (rows) => {
            resolvedPages.push(rows);
            resolve(rows.map((r) => ({ seq: r.seq, sizeBytes: r.content.length })));
          },
          reject,
        });
      }),
    // biome-ignore lint/suspicious/noThenProperty: the chunk query is awaited as Drizzle's builder is.
    then: (onFulfilled: (rows: Row[]) => unknown, onRejected?: (error: unknown) => unknown) =>
      Promise.resolve(resolvedPages.shift() ?? []).then(onFulfilled, onRejected),
  };
  const chain = {
    select: () => chain,
    from: () => chain,
    where: () => chain,
    orderBy: () => page,
  };
  return { db: chain as unknown as Database, queries };
}

const row = (seq: number): Row => ({
  seq,
  offsetBytes: (seq - 1) * 3,
  content: Buffer.from(`${seq}\n`),
  at: new Date(0),
});

afterEach(() => {
  vi.useRealTimers();
});

describe("SharedLogReads", () => {
  it("gives readers of the same page while it is read one query, and a new one after a notice or once settled", async () => {
    const { db, queries } = fakeDatabase();
    const reads = new SharedLogReads(db);
    const first = reads.read("run-a", 0);
    const second = reads.read("run-a", 0);
    reads.read("run-a", 5);
    reads.read("run-b", 0);
    expect(queries).toHaveLength(3);

    // A notice: a reader from now on must see what was stored since, so it reads anew.
    reads.forget("run-a");
    const third = reads.read("run-a", 0);
    expect(queries).toHaveLength(4);

    queries[0]!.resolve([row(1)]);
    expect(await first).toBe(await second);
    queries[3]!.resolve([row(1), row(2)]);
    expect((await third).chunks.map((r) => r.seq)).toEqual([1, 2]);

    // Settled reads are not kept: the next reader queries.
    reads.read("run-a", 0);
    expect(queries).toHaveLength(5);
  });
});

describe("RunLogFeed", () => {
  it("tries a failed read again after a pause and then sends the chunk, once", async () => {
    vi.useFakeTimers();
    const { db, queries } = fakeDatabase();
    const sent: { seq: number }[] = [];
    const socket = {
      emit: vi.fn(),
      timeout: () => ({
        emit: (_event: string, payload: { seq: number }) => {
          sent.push(payload);
        },
      }),
    };
    const log = { error: vi.fn() } as unknown as Logger;
    const feed = new RunLogFeed({
      reads: new SharedLogReads(db),
      log,
      socket: socket as never,
      budget: new SendBudget(1024 * 1024),
      runId: "run-a",
      logRunId: "run-a",
      afterSeq: 0,
      withLog: true,
    });

    feed.wake();
    expect(queries).toHaveLength(1);
    queries[0]!.reject(new Error("timeout exceeded when trying to connect"));
    await vi.advanceTimersByTimeAsync(0);
    expect(log.error).toHaveBeenCalledTimes(1);
    expect(queries).toHaveLength(1);

    await vi.advanceTimersByTimeAsync(READ_RETRY_MS);
    expect(queries).toHaveLength(2);
    queries[1]!.resolve([row(1)]);
    await vi.advanceTimersByTimeAsync(0);
    expect(sent.map((chunk) => chunk.seq)).toEqual([1]);
    feed.stop();
  });

  it("catches up on many small chunks with one page read (pages are capped by bytes, not by count)", async () => {
    vi.useFakeTimers();
    const { db, queries } = fakeDatabase();
    const sent: { seq: number }[] = [];
    const feed = new RunLogFeed({
      reads: new SharedLogReads(db),
      log: { error: vi.fn() } as unknown as Logger,
      socket: {
        emit: vi.fn(),
        timeout: () => ({ emit: (_event: string, payload: { seq: number }) => sent.push(payload) }),
      } as never,
      budget: new SendBudget(1024 * 1024),
      runId: "run-a",
      logRunId: "run-a",
      afterSeq: 0,
      withLog: true,
    });
    feed.wake();
    queries[0]!.resolve(Array.from({ length: 500 }, (_, i) => row(i + 1)));
    await vi.advanceTimersByTimeAsync(0);
    expect(sent).toHaveLength(500);
    expect(sent.at(-1)!.seq).toBe(500);
    // The page said nothing more follows: no second query.
    expect(queries).toHaveLength(1);
    feed.stop();
  });

  it("does not try again once stopped", async () => {
    vi.useFakeTimers();
    const { db, queries } = fakeDatabase();
    const feed = new RunLogFeed({
      reads: new SharedLogReads(db),
      log: { error: vi.fn() } as unknown as Logger,
      socket: { emit: vi.fn(), timeout: () => ({ emit: vi.fn() }) } as never,
      budget: new SendBudget(1024),
      runId: "run-a",
      logRunId: "run-a",
      afterSeq: 0,
      withLog: true,
    });
    feed.wake();
    queries[0]!.reject(new Error("database away"));
    await vi.advanceTimersByTimeAsync(0);
    feed.stop();
    await vi.advanceTimersByTimeAsync(5 * READ_RETRY_MS);
    expect(queries).toHaveLength(1);
  });
});

/**
 * Work on one run that must not overlap itself across worker processes, claimed per run with a
 * session-level PostgreSQL advisory lock on one dedicated connection per process and kind of work (not
 * a pooled one, so a claim never holds a pool connection while its work waits on SSH). PostgreSQL
 * releases the locks of a worker that dies with its connection, so a killed worker never leaves a run
 * unclaimable. Inside one process a set of run ids guards it too.
 *
 * - Staging: duplicate `run-stage` items are normal (the start-up reconcile and the free-slot wake-up
 *   send them, and "a duplicate is harmless" holds for the state machine), but two attempts that stage
 *   the same run at once unlink and rewrite each other's files while the other checks their sha256 or
 *   while the job already submitted reads them.
 * - Streaming a running job's log: one stream per log across all workers (logs/log-follower.ts); a
 *   worker that finds the log claimed leaves it to the worker streaming it.
 */
import pg from "pg";

/** First half of the advisory-lock key pair, per kind of work: ASCII "SF" + 1, + 2. */
const LOCK_CLASSES = { staging: 0x534601, "log-follow": 0x534602 } as const;
export type ClaimKind = keyof typeof LOCK_CLASSES;

/**
 * Second half of the key: 31 random bits of the run's UUID (v4). Two runs sharing them only makes the
 * later one wait for its retry (or be read by the poller), never stage or stream twice.
 */
export function runLockKey(runId: string): number {
  const hex = runId.replaceAll("-", "").slice(-8);
  return Number.parseInt(hex, 16) & 0x7fffffff;
}

export class RunClaims {
  private readonly held = new Set<string>();
  private client: pg.Client | null = null;
  private connecting: Promise<pg.Client> | null = null;

  private readonly lockClass: number;

  constructor(
    private readonly connectionString: string,
    readonly kind: ClaimKind = "staging",
  ) {
    this.lockClass = LOCK_CLASSES[kind];
  }

  /**
   * Claims `runId` for this attempt. False means another attempt, in this process or another worker,
   * holds it now: the caller leaves the run to that attempt.
   */
  async tryClaim(runId: string): Promise<boolean> {
    if (this.held.has(runId)) return false;
    this.held.add(runId);
    try {
      const client = await this.connection();
      const { rows } = await client.query<{ claimed: boolean }>(
        "select pg_try_advisory_lock($1::int, $2::int) as claimed",
        [this.lockClass, runLockKey(runId)],
      );
      if (rows[0]?.claimed) return true;
    } catch (error) {
      this.held.delete(runId);
      throw error;
    }
    this.held.delete(runId);
    return false;
  }

  async release(runId: string): Promise<void> {
    if (!this.held.delete(runId)) return;
    const client = this.client;
    if (!client) return; // the connection ended, and its locks with it
    await client
      .query("select pg_advisory_unlock($1::int, $2::int)", [this.lockClass, runLockKey(runId)])
      .catch(() => this.drop(client));
  }

  async close(): Promise<void> {
    const client = this.client;
    this.client = null;
    this.held.clear();
    await client?.end().catch(() => undefined);
  }

  private async connection(): Promise<pg.Client> {
    if (this.client) return this.client;
    this.connecting ??= (async () => {
      const client = new pg.Client({
        connectionString: this.connectionString,
        application_name: `sigmaflow-worker-claims-${this.kind}`,
      });
      // A restarted PostgreSQL ends the session (and its locks): connect again on the next claim.
      client.on("error", () => this.drop(client));
      client.on("end", () => this.drop(client));
      await client.connect();
      this.client = client;
      return client;
    })().finally(() => {
      this.connecting = null;
    });
    return this.connecting;
  }

  private drop(client: pg.Client): void {
    if (this.client === client) this.client = null;
  }
}

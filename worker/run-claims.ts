/**
 * Staging of one run must never overlap itself. Duplicate `run-stage` items are normal (the start-up
 * reconcile and the free-slot wake-up send them, and "a duplicate is harmless" holds for the state
 * machine), but two attempts that stage the same run at once unlink and rewrite each other's files while
 * the other checks their sha256 or while the job already submitted reads them.
 *
 * Inside one worker process a set of run ids guards it. Across worker processes a session-level
 * PostgreSQL advisory lock does, taken on one dedicated connection per process (not a pooled one, so
 * a staging never holds a pool connection while it waits on SSH): PostgreSQL releases the locks of a
 * worker that dies with its connection, so a killed worker never leaves a run unstageable.
 */
import pg from "pg";

/** First half of the advisory-lock key pair: says "staging of a run" (ASCII "SF" + 1). */
const STAGING_LOCK_CLASS = 0x534601;

/**
 * Second half of the key: 31 random bits of the run's UUID (v4). Two runs sharing them only makes the
 * later one wait for its retry, never stage twice.
 */
export function stagingLockKey(runId: string): number {
  const hex = runId.replaceAll("-", "").slice(-8);
  return Number.parseInt(hex, 16) & 0x7fffffff;
}

export class StagingClaims {
  private readonly held = new Set<string>();
  private client: pg.Client | null = null;
  private connecting: Promise<pg.Client> | null = null;

  constructor(private readonly connectionString: string) {}

  /**
   * Claims the staging of `runId` for this attempt. False means another attempt, in this process or
   * another worker, is staging it now: the caller leaves the run to that attempt.
   */
  async tryClaim(runId: string): Promise<boolean> {
    if (this.held.has(runId)) return false;
    this.held.add(runId);
    try {
      const client = await this.connection();
      const { rows } = await client.query<{ claimed: boolean }>(
        "select pg_try_advisory_lock($1::int, $2::int) as claimed",
        [STAGING_LOCK_CLASS, stagingLockKey(runId)],
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
      .query("select pg_advisory_unlock($1::int, $2::int)", [STAGING_LOCK_CLASS, stagingLockKey(runId)])
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
        application_name: "sigmaflow-worker-claims",
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

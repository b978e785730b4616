/**
 * Everything a step needs to act on one run's host: the run and host rows, an SSH session for the run's
 * account (credentials decrypted in memory, cached briefly), the scheduler adapter and the job reference.
 */
import { eq } from "drizzle-orm";
import { loadAccountCredentials } from "../server/credentials/account-credentials";
import { hosts, runs } from "../server/db/schema";
import type { RunPlan } from "../server/execution/run-plan";
import type { WorkerContext } from "./context";
import { schedulerFor } from "./schedulers";
import type { JobRef } from "./schedulers/types";
import { HostKeyUnconfirmedError } from "./ssh/errors";
import type { RemoteSession, SshTarget } from "./ssh/pool";

export type RunRow = typeof runs.$inferSelect;
export type HostRow = typeof hosts.$inferSelect;

const CREDENTIAL_TTL_MS = 5 * 60_000;
const credentialCache = new Map<string, { username: string; privateKey: string; at: number }>();

async function credentials(ctx: WorkerContext, accountId: string) {
  const cached = credentialCache.get(accountId);
  if (cached && Date.now() - cached.at < CREDENTIAL_TTL_MS) return cached;
  const loaded = await loadAccountCredentials(ctx.db, { secretsKey: ctx.config.secretsKey }, accountId);
  const entry = { ...loaded, at: Date.now() };
  credentialCache.set(accountId, entry);
  return entry;
}

export async function loadRun(ctx: WorkerContext, runId: string): Promise<RunRow | null> {
  const [run] = await ctx.db.select().from(runs).where(eq(runs.id, runId));
  return run ?? null;
}

export async function loadHost(ctx: WorkerContext, hostId: string): Promise<HostRow> {
  const [host] = await ctx.db.select().from(hosts).where(eq(hosts.id, hostId));
  if (!host) throw new Error(`host ${hostId} not found`);
  return host;
}

export async function sessionFor(
  ctx: WorkerContext,
  host: HostRow,
  accountId: string,
): Promise<RemoteSession> {
  if (!host.hostKey) throw new Error(`host ${host.name} has no pinned host key`);
  if (!host.hostKeyConfirmedAt) throw new HostKeyUnconfirmedError(host.name);
  const account = await credentials(ctx, accountId);
  const target: SshTarget = {
    key: `${host.id}:${accountId}`,
    address: host.address,
    port: host.port,
    username: account.username,
    privateKey: account.privateKey,
    pinnedHostKey: host.hostKey,
  };
  return ctx.ssh.session(target);
}

export function planOf(run: RunRow): RunPlan {
  return run.plan as RunPlan;
}

export function jobRefOf(run: RunRow): JobRef {
  return {
    runDir: run.remoteDir,
    token: run.submitToken,
    jobId: run.schedulerJobId,
    logName: planOf(run).logName,
  };
}

export type RunRuntime = Awaited<ReturnType<typeof runtimeFor>>;

export async function runtimeFor(ctx: WorkerContext, run: RunRow) {
  const host = await loadHost(ctx, run.hostId);
  const session = await sessionFor(ctx, host, run.hostAccountId);
  return { host, session, scheduler: schedulerFor(host.scheduler), job: jobRefOf(run), plan: planOf(run) };
}

/**
 * Runs inserted directly (no worker, no host) for the runs list's tests and benchmark: a group with a few
 * submitters, hosts, recipes and targets, and runs spread over them, over states and over creation times
 * with a fixed seed. Free of vitest, so bench/runs/runs-list.bench.ts uses it too.
 */
import { randomBytes } from "node:crypto";
import type { Database } from "../../../server/db/client";
import { allocations, hostAccounts, hosts, recipes, runs, targets } from "../../../server/db/schema";
import { type RunState, runStateSchema } from "../../../shared/schemas/runs";
import { addMember, createGroup, createUser } from "./people";

/** A small deterministic generator (mulberry32), so a seed gives the same spread every time. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** States weighted as a busy group's history looks: mostly finished, some in flight. */
const STATE_WEIGHTS: Record<RunState, number> = {
  done: 55,
  failed: 10,
  cancelled: 8,
  running: 10,
  queued: 6,
  submitted: 4,
  staging: 2,
  collecting: 2,
  held: 3,
};

export type SeededGroup = Awaited<ReturnType<typeof seedRunListGroup>>;

/**
 * A group with `submitters` members, `hostCount` hosts (each with a group account), `recipeCount`
 * recipes, `targetCount` targets and one allocation; no runs yet (see insertRuns).
 */
export async function seedRunListGroup(
  db: Database,
  label: string,
  counts: { submitters?: number; hostCount?: number; recipeCount?: number; targetCount?: number } = {},
) {
  const group = await createGroup(db, label);
  const submitters = [];
  for (let i = 0; i < (counts.submitters ?? 4); i++) {
    const user = await createUser(db, `${label}-member${i}`);
    await addMember(db, user.id, group.id, "member");
    submitters.push(user);
  }
  const hostRows = await db
    .insert(hosts)
    .values(
      Array.from({ length: counts.hostCount ?? 3 }, (_, i) => ({
        groupId: group.id,
        name: `host-${String.fromCharCode(97 + i)}`,
        address: "127.0.0.1",
        scheduler: "direct" as const,
        remoteBaseDir: "/tmp/sigmaflow-runs",
      })),
    )
    .returning();
  const accountRows = await db
    .insert(hostAccounts)
    .values(
      hostRows.map((host) => ({
        hostId: host.id,
        username: "runner",
        publicKey: "ssh-ed25519 AAAAC3NzaC1lZDI1NTE5AAAAIHRlc3Qta2V5LW5vdC11c2VkLWZvci1jb25uZWN0aW5n",
        privateKeyEncrypted: Buffer.from("not a key: these runs never reach a host"),
      })),
    )
    .returning();
  const recipeRows = await db
    .insert(recipes)
    .values(
      Array.from({ length: counts.recipeCount ?? 4 }, (_, i) => ({
        groupId: group.id,
        name: `recipe-${String.fromCharCode(97 + i)}`,
        stages: [],
      })),
    )
    .returning();
  const targetRows = await db
    .insert(targets)
    .values(
      Array.from({ length: counts.targetCount ?? 6 }, (_, i) => ({
        groupId: group.id,
        name: `Target ${String.fromCharCode(65 + i)}`,
      })),
    )
    .returning();
  const [allocation] = await db
    .insert(allocations)
    .values({
      groupId: group.id,
      name: "Seeded allocation",
      grantedCoreSeconds: 3600 * 1_000_000,
      startsAt: new Date("2020-01-01T00:00:00Z"),
      endsAt: new Date("2100-01-01T00:00:00Z"),
    })
    .returning();
  return {
    group,
    submitters,
    hosts: hostRows,
    accounts: accountRows,
    recipes: recipeRows,
    targets: targetRows,
    allocation: allocation!,
  };
}

export type SeedRun = {
  name: string;
  state: RunState;
  hostIndex: number;
  recipeIndex: number;
  /** null: a run without a target. */
  targetIndex: number | null;
  submitterIndex: number;
  createdAt: Date;
  updatedAt: Date;
};

/** `count` runs spread with the seed over the seeded group's states, hosts, recipes, targets and days. */
export function spreadRuns(
  seeded: SeededGroup,
  count: number,
  options: { seed?: number; from?: Date; days?: number } = {},
): SeedRun[] {
  const random = seededRandom(options.seed ?? 1);
  const from = (options.from ?? new Date("2026-01-01T00:00:00Z")).getTime();
  const spanMs = (options.days ?? 330) * 86_400_000;
  const weighted = runStateSchema.options.flatMap((state) => Array(STATE_WEIGHTS[state]).fill(state));
  const pick = (n: number) => Math.floor(random() * n);
  return Array.from({ length: count }, (_, i) => {
    const createdAt = new Date(from + Math.floor(random() * spanMs));
    return {
      name: `${["Water", "HNCO", "Pyrimidine", "CO2", "N2O"][pick(5)]} run ${i + 1}`,
      state: weighted[pick(weighted.length)] as RunState,
      hostIndex: pick(seeded.hosts.length),
      recipeIndex: pick(seeded.recipes.length),
      // One run in ten has no target.
      targetIndex: random() < 0.1 ? null : pick(seeded.targets.length),
      submitterIndex: pick(seeded.submitters.length),
      createdAt,
      updatedAt: new Date(createdAt.getTime() + Math.floor(random() * 3 * 86_400_000)),
    };
  });
}

/** Inserts the runs (1 000 rows per statement); returns their ids in the given order. */
export async function insertRuns(db: Database, seeded: SeededGroup, list: SeedRun[]): Promise<string[]> {
  const ids: string[] = [];
  for (let start = 0; start < list.length; start += 1000) {
    const rows = await db
      .insert(runs)
      .values(
        list.slice(start, start + 1000).map((run) => ({
          groupId: seeded.group.id,
          recipeId: seeded.recipes[run.recipeIndex]!.id,
          hostId: seeded.hosts[run.hostIndex]!.id,
          hostAccountId: seeded.accounts[run.hostIndex]!.id,
          allocationId: seeded.allocation.id,
          submittedBy: seeded.submitters[run.submitterIndex]!.id,
          targetId: run.targetIndex === null ? null : seeded.targets[run.targetIndex]!.id,
          name: run.name,
          spec: {},
          plan: { stages: [{ name: "main" }] },
          fingerprint: randomBytes(32).toString("hex"),
          state: run.state,
          cores: 4,
          wallTimeMinutes: 60,
          reservedCoreSeconds: 4 * 3600,
          remoteDir: "/tmp/sigmaflow-runs/seeded",
          submitToken: randomBytes(16).toString("hex"),
          createdAt: run.createdAt,
          updatedAt: run.updatedAt,
        })),
      )
      .returning({ id: runs.id });
    ids.push(...rows.map((row) => row.id));
  }
  return ids;
}

/**
 * Seeds the science part of the demo scenario (idempotent), through the same services the API uses:
 * the Kestrel group's targets and isotopologues (deploy/demo/targets.ts), the demo codes hf-orbitals
 * (psi4) and radial-scatter (deploy/demo-codes/radial-scatter), the two demo recipes, and a few runs of
 * both recipes on the development host. The runs are really computed: they are queued here and the
 * worker runs them like any other (psi4 and the demo solver on the development host), so their results
 * appear shortly after the first start. Run by deploy/start.sh once the server and the worker are up.
 */
import { fileURLToPath } from "node:url";
import { and, eq } from "drizzle-orm";
import type { Principal } from "../../server/auth/principal";
import { createDatabase, type Database } from "../../server/db/client";
import { codes, groups, hosts, recipes, runs, targets, users } from "../../server/db/schema";
import { createBoss, createRunQueues } from "../../server/queue/queues";
import { setCodeHosts } from "../../server/services/code-hosts.service";
import { createCode } from "../../server/services/codes.service";
import { createRecipe } from "../../server/services/recipes.service";
import { createRun } from "../../server/services/run-create.service";
import { createIsotopologue, createTarget } from "../../server/services/targets.service";
import { type CodeDefinitionInput, codeDefinitionSchema } from "../../shared/schemas/codes";
import { runAnalysisSchema } from "../../shared/schemas/results";
import type { RunSpecRequest } from "../../shared/schemas/runs";
import { createIsotopologueRequestSchema, createTargetRequestSchema } from "../../shared/schemas/targets";
import { hfOrbitalsCode } from "./codes/psi4-orbitals";
import { radialScatterCode } from "./codes/radial-scatter";
import { DEMO_RECIPES, DEMO_RUNS } from "./science-scenario";
import { DEMO_ISOTOPOLOGUES, DEMO_TARGETS } from "./targets";

const GROUP_SLUG = "kestrel-plasma";
const HOST_NAME = "kestrel-dev";

async function principalFor(db: Database, subject: string): Promise<Principal> {
  const [user] = await db.select().from(users).where(eq(users.oidcSubject, subject));
  if (!user) throw new Error(`seed the demo people first (deploy/demo/seed.ts): ${subject} is missing`);
  return {
    userId: user.id,
    email: user.email,
    displayName: user.displayName,
    isSiteAdmin: false,
    via: "session",
  };
}

async function ensureTargets(
  db: Database,
  principal: Principal,
  groupId: string,
): Promise<Map<string, string>> {
  const ids = new Map<string, string>();
  const existing = async (name: string) =>
    (
      await db
        .select({ id: targets.id })
        .from(targets)
        .where(and(eq(targets.groupId, groupId), eq(targets.name, name)))
    )[0]?.id;
  for (const target of DEMO_TARGETS) {
    const id =
      (await existing(target.name)) ??
      (await createTarget(db, principal, groupId, createTargetRequestSchema.parse(target), null)).id;
    ids.set(target.name, id);
  }
  for (const { parent, ...request } of DEMO_ISOTOPOLOGUES) {
    const id =
      (await existing(request.name)) ??
      (
        await createIsotopologue(
          db,
          principal,
          ids.get(parent)!,
          createIsotopologueRequestSchema.parse(request),
          null,
        )
      ).id;
    ids.set(request.name, id);
  }
  return ids;
}

/** Registers a demo code unless present; a new one is pinned to the development host, where it is installed. */
async function ensureCode(
  db: Database,
  principal: Principal,
  groupId: string,
  hostId: string,
  input: CodeDefinitionInput,
) {
  const definition = codeDefinitionSchema.parse(input);
  const [row] = await db
    .select({ id: codes.id })
    .from(codes)
    .where(
      and(eq(codes.groupId, groupId), eq(codes.name, definition.name), eq(codes.version, definition.version)),
    );
  if (row) return row.id;
  const created = await createCode(db, principal, groupId, definition, null);
  await setCodeHosts(db, principal, created.id, [hostId], null);
  return created.id;
}

/** Registers the demo codes and recipes; returns recipe ids by name. */
async function ensureRecipes(
  db: Database,
  principal: Principal,
  groupId: string,
  hostId: string,
): Promise<Map<string, string>> {
  const codeIds = new Map<string, string>([
    [hfOrbitalsCode.name, await ensureCode(db, principal, groupId, hostId, hfOrbitalsCode)],
    [radialScatterCode.name, await ensureCode(db, principal, groupId, hostId, radialScatterCode)],
  ]);
  const ids = new Map<string, string>();
  for (const recipe of DEMO_RECIPES) {
    const [row] = await db
      .select({ id: recipes.id })
      .from(recipes)
      .where(and(eq(recipes.groupId, groupId), eq(recipes.name, recipe.name)));
    const id =
      row?.id ??
      (
        await createRecipe(
          db,
          principal,
          groupId,
          {
            name: recipe.name,
            description: recipe.description,
            stages: recipe.stages.map((stage) => ({ name: stage.name, codeId: codeIds.get(stage.code)! })),
          },
          null,
        )
      ).id;
    ids.set(recipe.name, id);
  }
  return ids;
}

export async function seedDemoScience(databaseUrl: string): Promise<{ queued: string[] }> {
  const { db, pool } = createDatabase(databaseUrl);
  const boss = createBoss(databaseUrl, { maintenance: false });
  boss.on("error", (error) => console.error("queue:", error.message));
  await boss.start();
  try {
    await createRunQueues(boss);
    const [group] = await db.select().from(groups).where(eq(groups.slug, GROUP_SLUG));
    if (!group) throw new Error("seed the demo scenario first (deploy/demo/seed.ts)");
    const [host] = await db
      .select()
      .from(hosts)
      .where(and(eq(hosts.groupId, group.id), eq(hosts.name, HOST_NAME)));
    if (!host) throw new Error("register the development host first (deploy/demo/seed-cluster.ts)");
    const admin = await principalFor(db, "demo-group-admin");
    const researcher = await principalFor(db, "demo-researcher");
    const targetIds = await ensureTargets(db, researcher, group.id);
    const recipeIds = await ensureRecipes(db, admin, group.id, host.id);
    const queued: string[] = [];
    for (const demoRun of DEMO_RUNS) {
      const [existing] = await db
        .select({ id: runs.id })
        .from(runs)
        .where(and(eq(runs.groupId, group.id), eq(runs.name, demoRun.name)));
      if (existing) continue;
      const spec: RunSpecRequest = {
        name: demoRun.name,
        recipeId: recipeIds.get(demoRun.recipe)!,
        hostId: host.id,
        targetId: targetIds.get(demoRun.target)!,
        parameters: demoRun.parameters,
        analysis: demoRun.analysis ? runAnalysisSchema.parse(demoRun.analysis) : undefined,
        notifyByEmail: false,
      };
      await createRun({ db, pool, boss }, researcher, group.id, { spec, onDuplicate: "run" });
      queued.push(demoRun.name);
    }
    return { queued };
  } finally {
    await boss.stop({ graceful: true, close: true }).catch(() => undefined);
    await pool.end();
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const started = Date.now();
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("DATABASE_URL must be set");
  const { queued } = await seedDemoScience(url);
  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  console.log(
    queued.length > 0
      ? `demo targets, codes and recipes ready; ${queued.length} demo run(s) queued (${seconds} s): ${queued.join("; ")}`
      : `demo targets, codes, recipes and runs already present (${seconds} s)`,
  );
}

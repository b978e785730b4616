/**
 * Every host, account, code, recipe, target, allocation and run route, and every way of joining a room of
 * the live feed (support/live-matrix.ts), × every kind of caller gets exactly the status it should (the
 * same six callers as authorization-matrix.test.ts). Rule being checked (Sigmaflow's access policy): deny
 * by default; a group one does not belong to is a 404, also when reached through a host, code, recipe or
 * allocation id; a role too low is a 403; site admins may do everything.
 */
import { randomBytes, randomUUID } from "node:crypto";
import { afterAll, beforeAll } from "vitest";
import {
  allocations,
  codes,
  hostAccounts,
  hosts,
  recipes,
  runs,
  targets,
  targetVersions,
} from "../../server/db/schema";
import { LIVE_EVENTS } from "../../shared/schemas/live";
import { inspectTarget } from "../../shared/science/geometry";
import {
  type Caller,
  createMatrixCallers,
  describeMatrix,
  everyone,
  groupAdminOnly,
  groupRead,
  groupWrite,
  type MatrixCase,
  signedIn,
} from "./support/authorization-matrix";
import { codeDefinition } from "./support/code-fixtures";
import { startTestCluster, type TestCluster } from "./support/host-test-app";
import { describeLiveMatrix, type LiveMatrixCase, liveCredentials } from "./support/live-matrix";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let cluster: TestCluster;
const tokens = new Map<Caller, string>();
let groupId = "";
let groupAdminId = "";
let memberId = "";
let hostId = "";
let codeId = "";
let recipeId = "";
let allocationId = "";
let targetId = "";
let yearOffset = 0;
/** Each caller's token, revoked token and session cookies for the live feed's rows. */
let liveCredentialsByCaller: Awaited<ReturnType<typeof liveCredentials>> = new Map();

const suffix = () => randomBytes(3).toString("hex");

async function freshHost(): Promise<string> {
  const [row] = await database.db
    .insert(hosts)
    .values({
      groupId,
      name: `host-${suffix()}`,
      address: "127.0.0.1",
      port: cluster.port,
      scheduler: "direct",
      remoteBaseDir: "/scratch",
      hostKey: cluster.hostPublicKey,
      hostKeyFingerprint: cluster.hostKeyFingerprint,
    })
    .returning();
  return row!.id;
}

/** An account on a fresh host: the group's (no owner) or someone's personal one; enabled unless said. */
async function freshAccount(ownerUserId: string | null = null, disabled = false): Promise<string> {
  const [row] = await database.db
    .insert(hostAccounts)
    .values({
      hostId: await freshHost(),
      ownerUserId,
      username: ownerUserId === null ? "shared" : "researcher",
      publicKey: "ssh-ed25519 AAAA",
      privateKeyEncrypted: Buffer.from("unused"),
      disabledAt: disabled ? new Date() : null,
    })
    .returning();
  return row!.id;
}

const freshGroupAccount = () => freshAccount(null);

async function freshCode(createdBy: string | null = null): Promise<string> {
  const definition = codeDefinition();
  const [row] = await database.db
    .insert(codes)
    .values({ groupId, name: definition.name, version: definition.version, definition, createdBy })
    .returning();
  return row!.id;
}

async function freshRecipe(): Promise<string> {
  const [row] = await database.db
    .insert(recipes)
    .values({
      groupId,
      name: `recipe-${suffix()}`,
      stages: [{ name: "one", codeId }],
      createdBy: groupAdminId,
    })
    .returning();
  return row!.id;
}

/** Hydrogen fluoride, r = 0.917 Å (NIST CCCBDB experimental geometry; from memory): a target to point at. */
const HF_ATOMS = [
  { symbol: "H", massNumber: null, xAngstrom: 0, yAngstrom: 0, zAngstrom: 0, partialChargeE: null },
  { symbol: "F", massNumber: null, xAngstrom: 0, yAngstrom: 0, zAngstrom: 0.917, partialChargeE: null },
];

/** A target entered by `createdBy` (the group admin unless said), written straight into the database. */
async function freshTarget(createdBy: string | null = groupAdminId): Promise<string> {
  const derived = inspectTarget({
    atoms: HF_ATOMS.map((a) => ({
      symbol: a.symbol,
      positionAngstrom: [a.xAngstrom, a.yAngstrom, a.zAngstrom],
    })),
  });
  const [row] = await database.db
    .insert(targets)
    .values({ groupId, name: `target-${suffix()}`, createdBy })
    .returning();
  await database.db.insert(targetVersions).values({
    targetId: row!.id,
    version: 1,
    atoms: HF_ATOMS,
    charge: 0,
    multiplicity: 1,
    derived,
    formula: derived.formula,
    pointGroup: derived.pointGroup,
    abelianSubgroup: derived.abelianSubgroup,
    createdBy,
  });
  return row!.id;
}

/** A one-day period no earlier call has used, so allocations never overlap. */
function freshPeriod() {
  yearOffset += 1;
  const year = 2100 + yearOffset;
  return { startsAt: `${year}-01-01T00:00:00Z`, endsAt: `${year}-01-02T00:00:00Z` };
}

/** A done run of the group, written straight into the database (its results are read, never derived here). */
async function freshRun(): Promise<string> {
  const [row] = await database.db
    .insert(runs)
    .values({
      groupId,
      recipeId,
      hostId,
      hostAccountId: await freshGroupAccount(),
      allocationId,
      name: `run-${suffix()}`,
      spec: {},
      plan: { scriptName: "job.sh", logName: "job.log", stages: [], files: [] },
      fingerprint: "0".repeat(64),
      state: "done",
      cores: 1,
      wallTimeMinutes: 1,
      reservedCoreSeconds: 0,
      remoteDir: "/scratch/run",
      submitToken: `sf-${suffix()}${suffix()}`,
      resultsState: "none",
    })
    .returning();
  return row!.id;
}

const CASES: MatrixCase[] = [
  { name: "list hosts", method: "GET", path: () => `/api/groups/${groupId}/hosts`, expected: groupRead(200) },
  {
    name: "register a host",
    method: "POST",
    path: () => `/api/groups/${groupId}/hosts`,
    body: () => ({
      name: `node-${suffix()}`,
      address: "127.0.0.1",
      port: cluster.port,
      scheduler: "slurm",
      remoteBaseDir: "/scratch",
    }),
    expected: groupAdminOnly(201),
  },
  { name: "read a host", method: "GET", path: () => `/api/hosts/${hostId}`, expected: groupRead(200) },
  {
    name: "change a host",
    method: "PATCH",
    path: () => `/api/hosts/${hostId}`,
    body: () => ({ maxConcurrentRuns: 3 }),
    expected: groupAdminOnly(200),
  },
  {
    name: "refresh a host key",
    method: "POST",
    path: () => `/api/hosts/${hostId}/host-key/refresh`,
    expected: groupAdminOnly(200),
  },
  {
    name: "confirm a host key",
    method: "POST",
    path: () => `/api/hosts/${hostId}/host-key/confirm`,
    body: () => ({ fingerprint: cluster.hostKeyFingerprint }),
    expected: groupAdminOnly(200),
  },
  {
    name: "delete a host",
    method: "DELETE",
    path: async () => `/api/hosts/${await freshHost()}`,
    expected: groupAdminOnly(204),
  },
  {
    name: "list host accounts",
    method: "GET",
    path: () => `/api/hosts/${hostId}/accounts`,
    expected: groupRead(200),
  },
  {
    name: "set up a personal account",
    method: "POST",
    path: async () => `/api/hosts/${await freshHost()}/accounts`,
    body: () => ({ kind: "personal", username: "researcher" }),
    expected: groupWrite(201),
  },
  {
    name: "set up the group account",
    method: "POST",
    path: async () => `/api/hosts/${await freshHost()}/accounts`,
    body: () => ({ kind: "group", username: "shared" }),
    expected: groupAdminOnly(201),
  },
  {
    name: "delete the group account",
    method: "DELETE",
    path: async () => `/api/host-accounts/${await freshGroupAccount()}`,
    expected: groupAdminOnly(204),
  },
  {
    name: "disable the group account",
    method: "PATCH",
    path: async () => `/api/host-accounts/${await freshGroupAccount()}`,
    body: () => ({ disabled: true }),
    expected: groupAdminOnly(200),
  },
  {
    name: "enable a disabled group account",
    method: "PATCH",
    path: async () => `/api/host-accounts/${await freshAccount(null, true)}`,
    body: () => ({ disabled: false }),
    expected: groupAdminOnly(200),
  },
  {
    name: "disable one's own personal account (the member's)",
    method: "PATCH",
    path: async () => `/api/host-accounts/${await freshAccount(memberId)}`,
    body: () => ({ disabled: true }),
    expected: groupWrite(200),
  },
  {
    name: "disable someone else's personal account",
    method: "PATCH",
    path: async () => `/api/host-accounts/${await freshAccount(groupAdminId)}`,
    body: () => ({ disabled: true }),
    expected: groupAdminOnly(200),
  },
  {
    name: "replace the group account",
    method: "POST",
    path: async () => `/api/host-accounts/${await freshGroupAccount()}/replacement`,
    body: () => ({ username: "shared2" }),
    expected: groupAdminOnly(201),
  },
  {
    name: "replace one's own personal account (the member's)",
    method: "POST",
    path: async () => `/api/host-accounts/${await freshAccount(memberId)}/replacement`,
    body: () => ({ username: "researcher2" }),
    expected: groupWrite(201),
  },
  {
    name: "replace someone else's personal account",
    method: "POST",
    path: async () => `/api/host-accounts/${await freshAccount(groupAdminId)}/replacement`,
    body: () => ({ username: "researcher2" }),
    expected: groupAdminOnly(201),
  },
  { name: "list codes", method: "GET", path: () => `/api/groups/${groupId}/codes`, expected: groupRead(200) },
  {
    name: "register a code",
    method: "POST",
    path: () => `/api/groups/${groupId}/codes`,
    body: () => codeDefinition(),
    expected: groupWrite(201),
  },
  { name: "read a code", method: "GET", path: () => `/api/codes/${codeId}`, expected: groupRead(200) },
  {
    // Rendering writes nothing, so whoever may read the code may preview its input files.
    name: "preview a code's input files",
    method: "POST",
    path: () => `/api/codes/${codeId}/preview`,
    body: () => ({ parameters: { molecule: "N2" } }),
    expected: groupRead(200),
  },
  {
    name: "delete a code someone else registered",
    method: "DELETE",
    path: async () => `/api/codes/${await freshCode(groupAdminId)}`,
    expected: groupAdminOnly(204),
  },
  {
    // As with recipes, the member who registered a code may delete it.
    name: "delete a code one registered (the member's)",
    method: "DELETE",
    path: async () => `/api/codes/${await freshCode(memberId)}`,
    expected: groupWrite(204),
  },
  {
    // Retiring is reversible and removes nothing, so any member may do it, as with registering.
    name: "retire a code version",
    method: "PATCH",
    path: async () => `/api/codes/${await freshCode(groupAdminId)}`,
    body: () => ({ retired: true }),
    expected: groupWrite(200),
  },
  {
    name: "export codes",
    method: "GET",
    path: () => `/api/groups/${groupId}/codes/export`,
    expected: groupRead(200),
  },
  {
    name: "import codes",
    method: "POST",
    path: () => `/api/groups/${groupId}/codes/import`,
    body: () => ({ format: "sigmaflow-code-definitions", version: 1, codes: [codeDefinition()] }),
    expected: groupWrite(201),
  },
  {
    name: "list recipes",
    method: "GET",
    path: () => `/api/groups/${groupId}/recipes`,
    expected: groupRead(200),
  },
  {
    name: "create a recipe",
    method: "POST",
    path: () => `/api/groups/${groupId}/recipes`,
    body: () => ({ name: `recipe-${suffix()}`, stages: [{ name: "one", codeId }] }),
    expected: groupWrite(201),
  },
  { name: "read a recipe", method: "GET", path: () => `/api/recipes/${recipeId}`, expected: groupRead(200) },
  {
    name: "delete someone else's recipe",
    method: "DELETE",
    path: async () => `/api/recipes/${await freshRecipe()}`,
    expected: groupAdminOnly(204),
  },
  {
    name: "list targets",
    method: "GET",
    path: () => `/api/groups/${groupId}/targets`,
    expected: groupRead(200),
  },
  {
    name: "enter a target",
    method: "POST",
    path: () => `/api/groups/${groupId}/targets`,
    body: () => ({ name: `target-${suffix()}`, xyz: "2\nhydrogen fluoride\nH 0 0 0\nF 0 0 0.917\n" }),
    expected: groupWrite(201),
  },
  {
    name: "enter a target from an uploaded XYZ file",
    method: "POST",
    path: () => `/api/groups/${groupId}/targets/upload`,
    body: () => {
      const form = new FormData();
      form.append("name", `uploaded-${suffix()}`);
      form.append("file", new Blob(["2\nhydrogen fluoride\nH 0 0 0\nF 0 0 0.917\n"]), "hf.xyz");
      return form;
    },
    expected: groupWrite(201),
  },
  { name: "read a target", method: "GET", path: () => `/api/targets/${targetId}`, expected: groupRead(200) },
  {
    name: "read a target version",
    method: "GET",
    path: () => `/api/targets/${targetId}/versions/1`,
    expected: groupRead(200),
  },
  {
    name: "change a target (a new version)",
    method: "PATCH",
    path: () => `/api/targets/${targetId}`,
    body: () => ({ notes: `checked ${suffix()}` }),
    expected: groupWrite(200),
  },
  {
    name: "derive an isotopologue",
    method: "POST",
    path: async () => `/api/targets/${await freshTarget()}/isotopologues`,
    body: () => ({ name: `isotopologue-${suffix()}`, isotopes: [{ atom: 1, massNumber: 2 }] }),
    expected: groupWrite(201),
  },
  {
    name: "delete a target someone else entered",
    method: "DELETE",
    path: async () => `/api/targets/${await freshTarget(groupAdminId)}`,
    expected: groupAdminOnly(204),
  },
  {
    // As with codes and recipes, the member who entered a target may delete it.
    name: "delete a target one entered (the member's)",
    method: "DELETE",
    path: async () => `/api/targets/${await freshTarget(memberId)}`,
    expected: groupWrite(204),
  },
  {
    name: "list allocations",
    method: "GET",
    path: () => `/api/groups/${groupId}/allocations`,
    expected: groupRead(200),
  },
  {
    name: "create an allocation",
    method: "POST",
    path: () => `/api/groups/${groupId}/allocations`,
    body: () => ({ name: `grant ${suffix()}`, coreHours: 10, ...freshPeriod() }),
    expected: groupAdminOnly(201),
  },
  {
    name: "read a run's results",
    method: "GET",
    path: async () => `/api/runs/${await freshRun()}/results`,
    expected: groupRead(200),
  },
  {
    name: "read a run's log",
    method: "GET",
    path: async () => `/api/runs/${await freshRun()}/log?afterSeq=0&limit=10`,
    expected: groupRead(200),
  },
  {
    name: "download a run's whole log",
    method: "GET",
    path: async () => `/api/runs/${await freshRun()}/log/raw`,
    expected: groupRead(200),
  },
  {
    name: "read an allocation's ledger",
    method: "GET",
    path: () => `/api/allocations/${allocationId}/ledger`,
    expected: groupRead(200),
  },
];

beforeAll(async () => {
  database = await createTestDatabase("authz_exec");
  app = await startTestApp(database);
  cluster = await startTestCluster();
  const db = database.db;
  const callers = await createMatrixCallers(db);
  ({ groupId, groupAdminId, memberId } = callers);
  for (const [caller, token] of callers.tokens) tokens.set(caller, token);
  liveCredentialsByCaller = await liveCredentials(db, tokens, app.config.session.secret);
  hostId = await freshHost();
  codeId = await freshCode();
  recipeId = await freshRecipe();
  targetId = await freshTarget();
  const [allocation] = await db
    .insert(allocations)
    .values({
      groupId,
      name: "standing grant",
      grantedCoreSeconds: 3600,
      startsAt: new Date("2000-01-01T00:00:00Z"),
      endsAt: new Date("2000-12-31T00:00:00Z"),
    })
    .returning();
  allocationId = allocation!.id;
});

afterAll(async () => {
  await cluster?.stop();
  await app?.close();
  await database?.drop();
});

describeMatrix("authorization matrix: hosts, accounts, codes, recipes, allocations and runs", CASES, () => ({
  baseUrl: app.baseUrl,
  tokens,
}));

const LIVE_CASES: LiveMatrixCase[] = [
  {
    name: "a run's room",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: groupRead(200),
  },
  {
    name: "a run's room, resuming after a sequence number",
    event: LIVE_EVENTS.resumeRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 3 }),
    expected: groupRead(200),
  },
  {
    name: "a run's room for a run that does not exist",
    event: LIVE_EVENTS.joinRun,
    payload: () => ({ runId: randomUUID(), afterSeq: 0 }),
    expected: signedIn(404),
  },
  {
    name: "a group's room",
    event: LIVE_EVENTS.joinGroup,
    payload: () => ({ groupId }),
    expected: groupRead(200),
  },
  {
    name: "a run's room with a revoked API token",
    credential: "revoked token",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: everyone(401),
  },
  {
    name: "a run's room with an API token from another site's page",
    origin: "foreign",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: everyone(403),
  },
  {
    name: "a run's room with the session cookie from Sigmaflow's page",
    credential: "session",
    origin: "public",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: groupRead(200),
  },
  {
    name: "a group's room with the session cookie from Sigmaflow's page",
    credential: "session",
    origin: "public",
    event: LIVE_EVENTS.joinGroup,
    payload: () => ({ groupId }),
    expected: groupRead(200),
  },
  {
    name: "a run's room with the session cookie from another site's page",
    credential: "session",
    origin: "foreign",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: everyone(403),
  },
  {
    name: "a run's room with the cookie of a session that ended",
    credential: "ended session",
    origin: "public",
    event: LIVE_EVENTS.joinRun,
    payload: async () => ({ runId: await freshRun(), afterSeq: 0 }),
    expected: everyone(401),
  },
];

describeLiveMatrix("authorization matrix: joining rooms of the live feed", LIVE_CASES, () => ({
  baseUrl: app.baseUrl,
  publicUrl: app.config.publicUrl,
  credentials: liveCredentialsByCaller,
}));

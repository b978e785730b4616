import {
  type AdminUser,
  type ApiToken,
  type Group,
  type Host,
  type Invitation,
  type Me,
  type Member,
  RESULTS_CAUTION,
  type Result,
  type RunDetail,
} from "@shared/schemas";
import { HttpResponse, http } from "msw";
import { adminUsers, kestrel, kestrelMembers, marrow } from "./fixtures";
import { server } from "./server";

/** One request as the fake API saw it, for asserting headers and bodies. */
export type RecordedRequest = { method: string; path: string; headers: Headers; body: unknown };

type FakeApiState = {
  me: Me | null;
  groups: Group[];
  members: Record<string, Member[]>;
  invitations: Record<string, Invitation[]>;
  tokens: ApiToken[];
  users: AdminUser[];
  runs: Record<string, RunDetail[]>;
  /** The log per run id: text served as one chunk, or the chunks' bytes in sequence order. */
  logs: Record<string, string | Uint8Array[]>;
  /** Derived results per run id; a run's `resultsState` and `resultsMessage` come with them. */
  results: Record<string, Result[]>;
  /** Each group's hosts (none unless a test gives some). */
  hosts: Record<string, Host[]>;
};

function apiError(status: number, code: string, message: string, details?: unknown) {
  return HttpResponse.json({ error: { code, message, details } }, { status });
}

/**
 * An in-memory stand-in for the Sigmaflow API that follows the contract of shared/schemas and the
 * error shape `{ error: { code, message, details? } }`. Tests override single endpoints with
 * `server.use(...)` for failures.
 */
export function installFakeApi(initial: Partial<FakeApiState> = {}) {
  const state: FakeApiState = {
    me: null,
    groups: [kestrel, marrow],
    members: { [kestrel.id]: kestrelMembers(), [marrow.id]: [] },
    invitations: { [kestrel.id]: [], [marrow.id]: [] },
    tokens: [],
    users: adminUsers,
    runs: {},
    logs: {},
    results: {},
    hosts: {},
    ...initial,
  };
  const requests: RecordedRequest[] = [];

  async function record(request: Request) {
    const text = request.method === "GET" ? "" : await request.clone().text();
    requests.push({
      method: request.method,
      path: new URL(request.url).pathname,
      headers: request.headers,
      body: text ? JSON.parse(text) : undefined,
    });
  }

  function visibleGroups(): Group[] {
    const me = state.me;
    if (!me) return [];
    if (me.user.isSiteAdmin) return state.groups;
    const mine = new Set(me.memberships.map((membership) => membership.groupId));
    return state.groups.filter((group) => mine.has(group.id));
  }

  server.use(
    http.all("/api/*", async ({ request }) => {
      await record(request);
      if (!state.me && !new URL(request.url).pathname.startsWith("/api/health")) {
        return apiError(401, "unauthenticated", "Sign in to continue.");
      }
      return undefined;
    }),
    http.get("/api/health", () =>
      HttpResponse.json({ status: "ok", database: { ok: true, latencyMs: 2 }, version: "0.1.0" }),
    ),
    http.get("/api/me", () => HttpResponse.json(state.me)),
    http.get("/api/groups", () => HttpResponse.json({ groups: visibleGroups() })),
    http.get("/api/groups/:groupId", ({ params }) => {
      const group = visibleGroups().find((candidate) => candidate.id === params.groupId);
      return group ? HttpResponse.json(group) : apiError(404, "not_found", "No such group.");
    }),
    http.get("/api/groups/:groupId/members", ({ params }) =>
      HttpResponse.json({ members: state.members[String(params.groupId)] ?? [] }),
    ),
    http.patch("/api/groups/:groupId/members/:userId", async ({ params, request }) => {
      const body = (await request.json()) as { role: Member["role"] };
      const list = state.members[String(params.groupId)] ?? [];
      const member = list.find((candidate) => candidate.userId === params.userId);
      if (!member) return apiError(404, "not_found", "No such member.");
      member.role = body.role;
      return HttpResponse.json(member);
    }),
    http.delete("/api/groups/:groupId/members/:userId", ({ params }) => {
      const groupId = String(params.groupId);
      state.members[groupId] = (state.members[groupId] ?? []).filter(
        (member) => member.userId !== params.userId,
      );
      return new HttpResponse(null, { status: 204 });
    }),
    http.get("/api/groups/:groupId/invitations", ({ params }) =>
      HttpResponse.json({ invitations: state.invitations[String(params.groupId)] ?? [] }),
    ),
    http.post("/api/groups/:groupId/invitations", async ({ params, request }) => {
      const body = (await request.json()) as { email: string; role: Invitation["role"] };
      const groupId = String(params.groupId);
      const invitation: Invitation = {
        id: `1e5a0000-0000-4000-8000-${String((state.invitations[groupId]?.length ?? 0) + 1).padStart(12, "0")}`,
        groupId,
        email: body.email,
        role: body.role,
        status: "pending",
        invitedBy: state.me?.user.displayName ?? "",
        createdAt: "2025-05-06T09:00:00.000Z",
        expiresAt: "2099-05-20T09:00:00.000Z",
      };
      state.invitations[groupId] = [invitation, ...(state.invitations[groupId] ?? [])];
      return HttpResponse.json(invitation, { status: 201 });
    }),
    http.delete("/api/groups/:groupId/invitations/:invitationId", ({ params }) => {
      const invitation = state.invitations[String(params.groupId)]?.find(
        (item) => item.id === params.invitationId,
      );
      if (!invitation) return apiError(404, "not_found", "No such invitation.");
      invitation.status = "revoked";
      return new HttpResponse(null, { status: 204 });
    }),
    http.get("/api/groups/:groupId/hosts", ({ params }) =>
      HttpResponse.json({ hosts: state.hosts[String(params.groupId)] ?? [] }),
    ),
    http.get("/api/tokens", () => HttpResponse.json({ tokens: state.tokens })),
    http.post("/api/tokens", async ({ request }) => {
      const body = (await request.json()) as { name: string; expiresInDays: number | null };
      const token: ApiToken = {
        id: `70ce0000-bbbb-4ccc-8ddd-${String(state.tokens.length + 1).padStart(12, "0")}`,
        name: body.name,
        prefix: "sf_n7wq",
        createdAt: "2025-05-06T09:00:00.000Z",
        lastUsedAt: null,
        expiresAt: body.expiresInDays === null ? null : "2099-08-04T09:00:00.000Z",
      };
      state.tokens = [token, ...state.tokens];
      return HttpResponse.json({ token, secret: "sf_n7wq_SECRET-9f2c4e7a1b3d5f60" }, { status: 201 });
    }),
    http.delete("/api/tokens/:tokenId", ({ params }) => {
      state.tokens = state.tokens.filter((token) => token.id !== params.tokenId);
      return new HttpResponse(null, { status: 204 });
    }),
    http.get("/api/admin/users", () => HttpResponse.json({ users: state.users })),
    // One page holding every run (tests/client/runs-table.test.tsx checks the list's query itself).
    http.get("/api/groups/:groupId/runs", ({ params }) => {
      const runs = state.runs[String(params.groupId)] ?? [];
      return HttpResponse.json({ runs, total: runs.length, page: 1, pageSize: 50 });
    }),
    http.get("/api/runs/:runId", ({ params }) => {
      const run = findRun(String(params.runId));
      return run ? HttpResponse.json(run) : apiError(404, "not_found", "No such run.");
    }),
    // As the server's log service: pages of chunks after afterSeq, bytes in base64, done once the run is
    // final and the page reaches the last chunk.
    http.get("/api/runs/:runId/log", ({ params, request }) => {
      const url = new URL(request.url);
      const afterSeq = Number(url.searchParams.get("afterSeq") ?? 0);
      const limit = Number(url.searchParams.get("limit") ?? 500);
      const stored = state.logs[String(params.runId)] ?? [];
      const all = typeof stored === "string" ? [new TextEncoder().encode(stored)] : stored;
      let offsetBytes = 0;
      const chunks = all.map((bytes, index) => {
        const chunk = {
          seq: index + 1,
          offsetBytes,
          dataBase64: Buffer.from(bytes).toString("base64"),
          at: "2026-11-30T10:02:00.000Z",
        };
        offsetBytes += bytes.length;
        return chunk;
      });
      const page = chunks.filter((chunk) => chunk.seq > afterSeq).slice(0, limit);
      const lastSeq = page.at(-1)?.seq ?? afterSeq;
      const run = findRun(String(params.runId));
      const final = run ? ["done", "failed", "cancelled"].includes(run.state) : false;
      return HttpResponse.json({ chunks: page, lastSeq, done: final && lastSeq >= chunks.length });
    }),
    // As the server's results service: the run's state of deriving results and the rows derived.
    http.get("/api/runs/:runId/results", ({ params }) => {
      const run = findRun(String(params.runId));
      if (!run) return apiError(404, "not_found", "No such run.");
      return HttpResponse.json({
        runId: run.id,
        state: run.resultsState,
        message: run.resultsMessage,
        caution: RESULTS_CAUTION,
        results: state.results[run.id] ?? [],
      });
    }),
    http.post("/api/runs/:runId/cancel", ({ params }) => {
      const run = findRun(String(params.runId));
      if (!run) return apiError(404, "not_found", "No such run.");
      run.cancelRequested = true;
      return HttpResponse.json(run);
    }),
  );

  function findRun(runId: string): RunDetail | undefined {
    return Object.values(state.runs)
      .flat()
      .find((run) => run.id === runId);
  }

  return { state, requests };
}

export { apiError };

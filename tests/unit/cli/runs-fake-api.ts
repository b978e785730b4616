/**
 * A fake Sigmaflow HTTP API on node:http for the `sigmaflow runs` tests: routes answer from handlers a test
 * sets, every request is recorded, and anything unrouted (the live feed's `/api/live` among them) is a 404
 * in the API's error shape.
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";

export const TOKEN = "sf_test_token_0123456789";
export const GROUP_ID = "6f1c2a4e-1b2c-4d3e-8f90-0a1b2c3d4e5f";
export const RUN_ID = "0b6f3e2a-5c4d-4e3f-9a8b-7c6d5e4f3a2b";
export const USER_ID = "1a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d";

export type Handler = (
  url: URL,
  req: IncomingMessage,
) => { status?: number; body: unknown } | Promise<{ status?: number; body: unknown }>;

export type FakeApi = {
  url: string;
  server: Server;
  /** `METHOD /path` (no query) → handler. */
  routes: Map<string, Handler>;
  /** Every request as `METHOD /path?query` with its authorization header. */
  requests: { line: string; authorization: string | undefined }[];
  close(): Promise<void>;
};

export async function startFakeApi(): Promise<FakeApi> {
  const routes = new Map<string, Handler>();
  const requests: FakeApi["requests"] = [];
  const server: Server = createServer(async (req: IncomingMessage, res: ServerResponse) => {
    const url = new URL(req.url ?? "/", "http://fake");
    requests.push({
      line: `${req.method} ${url.pathname}${url.search}`,
      authorization: req.headers.authorization,
    });
    const send = (status: number, body: unknown) => {
      res.writeHead(status, { "content-type": "application/json" });
      res.end(JSON.stringify(body));
    };
    if (req.headers.authorization !== `Bearer ${TOKEN}`) {
      return send(401, { error: { code: "unauthorized", message: "Sign in first." } });
    }
    const handler = routes.get(`${req.method} ${url.pathname}`);
    if (!handler) return send(404, { error: { code: "not_found", message: `No route ${url.pathname}.` } });
    const answer = await handler(url, req);
    send(answer.status ?? 200, answer.body);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    server,
    routes,
    requests,
    close: () =>
      new Promise((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}

export function membership(groupId: string, slug: string, name: string) {
  return { groupId, groupSlug: slug, groupName: name, role: "member" as const };
}

export function me(memberships: ReturnType<typeof membership>[]) {
  return {
    user: { id: USER_ID, email: "r@example.org", displayName: "Researcher", isSiteAdmin: false },
    memberships,
    csrfToken: "",
  };
}

/** A run summary as `GET /api/groups/:id/runs` lists it. */
export function runSummary(overrides: Record<string, unknown> = {}) {
  return {
    id: RUN_ID,
    groupId: GROUP_ID,
    name: "water elastic",
    recipeId: "2b3c4d5e-6f7a-4b8c-9d0e-1f2a3b4c5d6e",
    hostId: "3c4d5e6f-7a8b-4c9d-8e1f-2a3b4c5d6e7f",
    targetId: "4d5e6f7a-8b9c-4d0e-9f2a-3b4c5d6e7f8a",
    targetVersion: 2,
    targetName: "water",
    state: "running",
    stateMessage: null,
    fingerprint: "f".repeat(64),
    cores: 4,
    wallTimeMinutes: 30,
    reservedCoreHours: 2,
    chargedCoreHours: null,
    schedulerJobId: "4242",
    exitCode: null,
    resubmittedFrom: null,
    reusedFrom: null,
    submittedById: USER_ID,
    submittedByName: "Researcher",
    cancelRequested: false,
    cancelRequestedByName: null,
    progress: null,
    resultsState: null,
    resultsMessage: null,
    createdAt: "2026-12-05T01:02:03.000Z",
    startedAt: "2026-12-05T01:02:30.000Z",
    finishedAt: null,
    ...overrides,
  };
}

/** A run detail as `GET /api/runs/:id` returns it. */
export function runDetail(overrides: Record<string, unknown> = {}) {
  const summary = runSummary(overrides);
  return {
    ...summary,
    spec: {
      name: summary.name,
      recipeId: summary.recipeId,
      hostId: summary.hostId,
      parameters: {},
      resources: { cores: 4, wallTimeMinutes: 30 },
      notifyByEmail: false,
    },
    events: [],
    artifacts: [],
    timings: [],
    ...overrides,
  };
}

/** One page of `GET /api/runs/:id/log`. */
export function logPage(
  chunks: { seq: number; offsetBytes: number; data: Buffer }[],
  lastSeq: number,
  done: boolean,
) {
  return {
    chunks: chunks.map((c) => ({
      seq: c.seq,
      offsetBytes: c.offsetBytes,
      dataBase64: c.data.toString("base64"),
      at: "2026-12-05T01:03:00.000Z",
    })),
    lastSeq,
    done,
  };
}

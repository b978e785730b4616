/**
 * Connections to the live feed are checked again while they stay open: a token revoked after the join
 * disconnects its socket, and a person removed from a group leaves that group's room (Sigmaflow's rule:
 * what a revoked credential or a lost membership could read stops at the next check).
 */
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { memberships } from "../../server/db/schema";
import { groupRoom } from "../../server/realtime/room-broadcasts";
import { createApiToken, revokeApiToken } from "../../server/services/tokens.service";
import { LIVE_EVENTS } from "../../shared/schemas/live";
import { connectLive, emitWithAck } from "./support/live-client";
import { addMember, createGroup, createUser } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

const RECHECK_MS = 200;

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;

beforeAll(async () => {
  database = await createTestDatabase("live_recheck");
  app = await startTestApp(database, { live: { recheckIntervalMs: RECHECK_MS } });
}, 60_000);

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

async function personInGroup(label: string) {
  const user = await createUser(database.db, label);
  const group = await createGroup(database.db, label);
  await addMember(database.db, user.id, group.id, "member");
  const principal = {
    userId: user.id,
    email: user.email,
    displayName: user.displayName,
    isSiteAdmin: false,
    via: "session" as const,
  };
  const token = await createApiToken(database.db, principal, { name: "live", expiresInDays: 1 }, null);
  return { user, group, principal, token };
}

describe("a live connection checked again", () => {
  it("is disconnected once its token is revoked", async () => {
    const { group, principal, token } = await personInGroup("revoked");
    const socket = await connectLive(app.baseUrl, { token: token.secret });
    expect(await emitWithAck(socket, LIVE_EVENTS.joinGroup, { groupId: group.id })).toEqual({ ok: true });
    await revokeApiToken(database.db, principal, token.token.id, null);
    await waitFor(
      "the socket to be disconnected",
      async () => socket.disconnected,
      (gone) => gone,
      { timeoutMs: 10_000 },
    );
    expect(socket.connected).toBe(false);
  });

  it("leaves a group's room once its person is no longer a member, and stays connected", async () => {
    const { user, group, token } = await personInGroup("removed");
    const socket = await connectLive(app.baseUrl, { token: token.secret });
    expect(await emitWithAck(socket, LIVE_EVENTS.joinGroup, { groupId: group.id })).toEqual({ ok: true });
    const socketId = socket.id!;
    const inRoom = () => app.live.io.sockets.adapter.rooms.get(groupRoom(group.id))?.has(socketId) ?? false;
    expect(inRoom()).toBe(true);
    await database.db
      .delete(memberships)
      .where(and(eq(memberships.userId, user.id), eq(memberships.groupId, group.id)));
    await waitFor(
      "the socket to leave the room",
      async () => inRoom(),
      (still) => !still,
      {
        timeoutMs: 10_000,
      },
    );
    expect(socket.connected).toBe(true);
    socket.disconnect();
  });
});

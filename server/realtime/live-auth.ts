/**
 * Who is on the other end of a live socket. The handshake carries the signed-in session cookie (the
 * server's own session middleware reads it) or an API token in `auth: { token }`, checked like an
 * `Authorization: Bearer` token (unknown, revoked or expired tokens are refused). A token wins over a
 * cookie, as on HTTP.
 *
 * Browsers always send an Origin on a WebSocket handshake and on cross-origin requests: one other than
 * Sigmaflow's public URL is refused, so another site cannot use a visitor's session cookie. Clients
 * without an Origin (scripts, the command line; a same-origin long-polling request) pass that check;
 * they still need a session or a token.
 *
 * Credentials are checked again at every join, so a token revoked or a session ended after connecting
 * cannot join further rooms.
 */
import type { IncomingMessage } from "node:http";
import type { RequestHandler } from "express";
import type { Session, SessionData } from "express-session";
import type { Socket } from "socket.io";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { AppError, unauthenticated } from "../http/errors";
import type { Logger } from "../logger";
import { authenticateApiToken } from "../services/tokens.service";
import { findPrincipal } from "../services/users.service";

/** Longer strings are not Sigmaflow tokens (`sf_` and 43 base64url characters). */
const MAX_TOKEN_LENGTH = 256;

type SessionWithPassport = Session & Partial<SessionData> & { passport?: { user?: unknown } };
type HandshakeRequest = IncomingMessage & { _query?: Record<string, string>; session?: SessionWithPassport };

export type Credential = { kind: "token"; secret: string } | { kind: "session" };

/** A refusal of the connection: socket.io hands `message` and `data` to the client's `connect_error`. */
export class LiveAuthError extends Error {
  readonly data: { code: string };
  constructor(code: string, message: string) {
    super(message);
    this.data = { code };
  }
}

/** The Origin a browser page of this Sigmaflow sends: the scheme, host and port of the public URL. */
export function publicOrigin(publicUrl: string): string {
  return new URL(publicUrl).origin;
}

/** Absent (not a browser, or a same-origin request that carries none) or exactly ours. */
export function originAllowed(origin: string | undefined, expected: string): boolean {
  return origin === undefined || origin === expected;
}

/** engine.io's `allowRequest`: refuses a handshake from a foreign Origin with 403. */
export function originCheck(expected: string, log: Logger) {
  return (req: IncomingMessage, done: (error: string | null | undefined, success: boolean) => void) => {
    const origin = req.headers.origin;
    if (originAllowed(origin, expected)) return done(null, true);
    log.warn(
      { origin: origin?.slice(0, 200), expected },
      "live feed: handshake from a foreign Origin refused (is SIGMAFLOW_PUBLIC_URL the address people open?)",
    );
    done("origin not allowed", false);
  };
}

/**
 * The session middleware on handshake requests only (later requests of a long-polling connection belong
 * to a socket that is already authenticated), and never for a foreign Origin, which is refused anyway.
 */
export function sessionOnHandshake(session: RequestHandler, expectedOrigin: string) {
  return (req: HandshakeRequest, res: unknown, next: (error?: unknown) => void) => {
    const isHandshake = req._query?.sid === undefined;
    if (!isHandshake || !originAllowed(req.headers.origin, expectedOrigin)) return next();
    session(req as never, res as never, next);
  };
}

function credentialOf(socket: Socket): Credential | null {
  const token: unknown = (socket.handshake.auth as Record<string, unknown> | undefined)?.token;
  if (token !== undefined) {
    if (typeof token !== "string" || token.length === 0 || token.length > MAX_TOKEN_LENGTH)
      throw new LiveAuthError("bad_authorization", "Send the API token as a string in `auth.token`.");
    return { kind: "token", secret: token };
  }
  const session = (socket.request as HandshakeRequest).session;
  return session?.passport?.user ? { kind: "session" } : null;
}

/** The session's user as stored now (the session may have ended since the handshake). */
async function sessionPrincipal(db: Database, request: HandshakeRequest): Promise<Principal | null> {
  const session = request.session;
  if (!session) return null;
  const reloaded = await new Promise<boolean>((resolve) =>
    session.reload((error: unknown) => resolve(!error)),
  );
  const userId = reloaded ? request.session?.passport?.user : undefined;
  if (typeof userId !== "string") return null;
  return findPrincipal(db, userId, "session");
}

async function principalFor(db: Database, socket: Socket, credential: Credential): Promise<Principal> {
  if (credential.kind === "token") {
    const principal = await authenticateApiToken(db, credential.secret);
    if (!principal) throw new AppError(401, "invalid_token", "The API token is unknown, revoked or expired.");
    return principal;
  }
  const principal = await sessionPrincipal(db, socket.request as HandshakeRequest);
  if (!principal) throw unauthenticated();
  return principal;
}

/** socket.io middleware: admits a socket with a valid credential and remembers which one it used. */
export function authenticateSocket(db: Database) {
  return async (socket: Socket, next: (error?: Error) => void) => {
    try {
      const credential = credentialOf(socket);
      if (!credential)
        throw new LiveAuthError("unauthenticated", "Sign in, or send an API token in `auth.token`.");
      await principalFor(db, socket, credential);
      socket.data.credential = credential;
      next();
    } catch (error) {
      if (error instanceof LiveAuthError) return next(error);
      if (error instanceof AppError) return next(new LiveAuthError(error.code, error.message));
      next(error as Error);
    }
  };
}

/** The socket's principal as of now; throws the API's 401 errors when its credential no longer holds. */
export function currentPrincipal(db: Database, socket: Socket): Promise<Principal> {
  const credential = socket.data.credential as Credential | undefined;
  if (!credential) return Promise.reject(unauthenticated());
  return principalFor(db, socket, credential);
}

/**
 * The development cluster host: a real SSH server (ssh2's Server) that Sigmaflow's worker reaches
 * exactly as it reaches a cluster login node. Public-key login for one user, commands through
 * `/bin/sh -c` in a sandbox folder that is that user's home, and SFTP confined to the same folder.
 */
import { mkdir } from "node:fs/promises";
import { createServer, type Socket } from "node:net";
import path from "node:path";
import ssh2, { type Connection } from "ssh2";
import { z } from "zod";
import { authenticate } from "./auth";
import { loadHostKey } from "./host-key";
import { serveConnection } from "./session";
import { Sandbox } from "./sftp/sandbox";

const optionsSchema = z.object({
  host: z.string().min(1).default("127.0.0.1"),
  /** 0 picks a free port; the bound one is in the result. */
  port: z.number().int().min(0).max(65535),
  /** The sandbox and home folder of the SSH user; created if missing. */
  rootDir: z.string().min(1),
  /** Private host key (OpenSSH or PEM); an ed25519 key is generated here if the file is missing. */
  hostKeyPath: z.string().min(1),
  /** OpenSSH authorized_keys format, read again at every login attempt. */
  authorizedKeysPath: z.string().min(1),
  username: z.string().min(1).default("sigmaflow"),
  /** Concurrent session channels per connection, like OpenSSH's MaxSessions. */
  maxSessionsPerConnection: z.number().int().min(1).default(10),
});

export type FakeClusterOptions = z.input<typeof optionsSchema> & {
  /** Diagnostics (refused channels, client errors); silent when omitted. */
  log?: (message: string) => void;
};

export type FakeCluster = {
  port: number;
  hostKeyFingerprint: string;
  hostPublicKey: string;
  close(): Promise<void>;
};

/** Identification string after "SSH-2.0-"; names this server honestly in client logs. */
const SERVER_IDENT = "SigmaflowFakeCluster_0.1";
/** How long close() lets clients take the disconnect before their sockets are cut. */
const CLOSE_GRACE_MS = 1000;

export async function startFakeCluster(input: FakeClusterOptions): Promise<FakeCluster> {
  const options = optionsSchema.parse(input);
  const log = input.log ?? (() => undefined);
  const rootDir = path.resolve(options.rootDir);
  await mkdir(rootDir, { recursive: true });
  const sandbox = await Sandbox.open(rootDir);
  const hostKey = await loadHostKey(path.resolve(options.hostKeyPath));
  const authorizedKeysPath = path.resolve(options.authorizedKeysPath);

  const connections = new Set<Connection>();
  const sockets = new Set<Socket>();

  const ssh = new ssh2.Server({ hostKeys: [hostKey.privateKey], ident: SERVER_IDENT }, (connection) => {
    connections.add(connection);
    connection.on("error", (error: Error) => log(`connection: ${error.message}`));
    connection.on("close", () => connections.delete(connection));
    connection.on("authentication", (ctx) =>
      authenticate(ctx, { username: options.username, authorizedKeysPath, log }),
    );
    connection.on("ready", () =>
      serveConnection(connection, {
        sandbox,
        username: options.username,
        maxSessions: options.maxSessionsPerConnection,
        log,
      }),
    );
  });
  ssh.on("error", (error: Error) => log(`server: ${error.message}`));

  // Our own listener hands sockets to ssh2, so close() can cut connections that do not leave.
  const listener = createServer((socket) => {
    sockets.add(socket);
    socket.on("close", () => sockets.delete(socket));
    socket.on("error", (error) => log(`socket: ${error.message}`));
    ssh.injectSocket(socket);
  });
  await new Promise<void>((resolve, reject) => {
    listener.once("error", reject);
    listener.listen(options.port, options.host, () => {
      listener.off("error", reject);
      resolve();
    });
  });
  listener.on("error", (error) => log(`listener: ${error.message}`));
  const address = listener.address();
  if (address === null || typeof address === "string") throw new Error("listener has no TCP address");

  let closing: Promise<void> | undefined;
  const close = () => {
    closing ??= new Promise<void>((resolve) => {
      listener.close(() => resolve());
      for (const connection of connections) connection.end();
      const cut = setTimeout(() => {
        for (const socket of sockets) socket.destroy();
      }, CLOSE_GRACE_MS);
      cut.unref();
      listener.once("close", () => clearTimeout(cut));
    });
    return closing;
  };

  return {
    port: address.port,
    hostKeyFingerprint: hostKey.fingerprint,
    hostPublicKey: hostKey.publicKey,
    close,
  };
}

/**
 * What an authenticated connection may do: open up to `maxSessions` session channels at a time
 * (OpenSSH's MaxSessions, default 10) and, in each, run one command (exec) or the SFTP subsystem.
 * Terminals, shells, other subsystems, agent and X11 forwarding are refused; port forwarding is
 * refused by ssh2 itself because no handler is registered for it.
 */
import type { Connection, Session } from "ssh2";
import { OPEN_FAILURE, rejectChannel } from "./channel-refusal";
import { runCommand } from "./exec";
import { serveSftp } from "./sftp/handlers";
import type { Sandbox } from "./sftp/sandbox";

export type SessionOptions = {
  sandbox: Sandbox;
  username: string;
  maxSessions: number;
  log: (message: string) => void;
};

function serveSession(session: Session, options: SessionOptions): void {
  const { log } = options;
  session.on("error", (error: Error) => log(`session: ${error.message}`));
  // sshd without AcceptEnv answers env requests with failure and runs the command without them;
  // doing the same keeps clients from relying on variables a real host would drop.
  session.on("env", (_accept, reject) => reject?.());
  // No terminals: commands run on pipes, as they do for a batch client. The client carries on.
  session.on("pty", (_accept, reject) => reject?.());
  session.on("shell", (_accept, reject) => reject?.());
  session.on("subsystem", (_accept, reject) => reject?.());
  session.on("exec", (accept, _reject, info) => {
    const channel = accept?.();
    if (!channel) return;
    runCommand(channel, info.command, {
      rootDir: options.sandbox.realRoot,
      username: options.username,
      log,
    });
  });
  session.on("sftp", (accept) => {
    const sftp = accept?.();
    if (!sftp) return;
    serveSftp(sftp, options.sandbox, log);
  });
}

export function serveConnection(connection: Connection, options: SessionOptions): void {
  let openSessions = 0;
  connection.on("session", (accept, reject) => {
    if (openSessions >= options.maxSessions) {
      options.log(`refusing session channel: ${openSessions} already open (limit ${options.maxSessions})`);
      rejectChannel(connection, reject, OPEN_FAILURE.ADMINISTRATIVELY_PROHIBITED, "open failed");
      return;
    }
    const session = accept();
    if (!session) return;
    openSessions += 1;
    session.once("close", () => {
      openSessions -= 1;
    });
    serveSession(session, options);
  });
}

/**
 * Sends an exit-status request (RFC 4254 §6.10) on an SFTP subsystem channel. ssh2's server-side
 * SFTP object has no exit() like its exec channels do, so this goes through the connection's
 * protocol writer (an ssh2 internal, pinned at 1.17.0); without it, it does nothing.
 */
import type { SFTPWrapper } from "ssh2";

type ChannelInternals = {
  outgoing?: { id: number; state: string };
  _protocol?: { exitStatus?: (channelId: number, status: number) => void };
};

export function sendExitStatus(sftp: SFTPWrapper, status: number): void {
  const channel = sftp as unknown as ChannelInternals;
  const outgoing = channel.outgoing;
  const exitStatus = channel._protocol?.exitStatus;
  if (outgoing?.state !== "open" || typeof exitStatus !== "function") return;
  exitStatus.call(channel._protocol, outgoing.id, status);
}

/**
 * Refuses a channel open with a reason code and a description of our choosing. ssh2's `reject()`
 * for incoming channels always sends CONNECT_FAILED with an empty description, which leaves the
 * client with "(SSH) Channel open failure: " and nothing to go on. OpenSSH answers an open beyond
 * MaxSessions with ADMINISTRATIVELY_PROHIBITED and "open failed" (serverloop.c, from memory), so
 * its ssh prints "open failed: administratively prohibited: open failed".
 *
 * This wraps the connection's protocol writer for the duration of the synchronous `reject()`
 * call; it relies on ssh2 internals (pinned at 1.17.0) and falls back to a plain reject.
 */
import type { Connection } from "ssh2";

type OpenFail = (recipient: number, reason: number, description: string) => void;
type ProtocolWriter = { channelOpenFail?: OpenFail };

/** RFC 4254 §5.1 reason codes. */
export const OPEN_FAILURE = {
  ADMINISTRATIVELY_PROHIBITED: 1,
  CONNECT_FAILED: 2,
  RESOURCE_SHORTAGE: 4,
} as const;

export function rejectChannel(
  connection: Connection,
  reject: () => void,
  reason: number,
  description: string,
): void {
  const protocol = (connection as unknown as { _protocol?: ProtocolWriter })._protocol;
  const original = protocol?.channelOpenFail;
  if (!protocol || typeof original !== "function") {
    reject();
    return;
  }
  const hadOwn = Object.hasOwn(protocol, "channelOpenFail");
  protocol.channelOpenFail = (recipient) => original.call(protocol, recipient, reason, description);
  try {
    reject();
  } finally {
    if (hadOwn) protocol.channelOpenFail = original;
    else delete protocol.channelOpenFail;
  }
}

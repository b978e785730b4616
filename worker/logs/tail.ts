/**
 * Reads a job's log by byte offset, the way the poller follows it: each call returns the complete lines
 * after `offsetBytes` and the offset to ask from next time, so no line is lost, doubled or cut in two
 * across polls. Offsets count bytes, not characters: UTF-8 text is never decoded from half a character.
 */
import type { RemoteSession } from "../ssh/session";

export const DEFAULT_LOG_CHUNK_BYTES = 256 * 1024;
/** The longest UTF-8 encoding of one character (RFC 3629 §3). */
const MAX_UTF8_BYTES = 4;

export type LogChunk = { text: string; nextOffsetBytes: number };

/**
 * Length of the longest prefix of `bytes` that does not end inside a UTF-8 sequence. Only the last (up to
 * four) bytes are inspected: a lead byte 110xxxxx, 1110xxxx or 11110xxx announces 2, 3 or 4 bytes
 * (RFC 3629 §3), continuation bytes are 10xxxxxx. Invalid bytes are left for the decoder to replace.
 */
export function completeUtf8Length(bytes: Uint8Array): number {
  const length = bytes.length;
  let start = length - 1;
  while (start >= 0 && length - start < MAX_UTF8_BYTES && (bytes[start]! & 0xc0) === 0x80) start -= 1;
  if (start < 0) return length;
  const lead = bytes[start]!;
  const needed =
    lead >= 0xf0 && lead <= 0xf7
      ? 4
      : lead >= 0xe0 && lead <= 0xef
        ? 3
        : lead >= 0xc0 && lead <= 0xdf
          ? 2
          : 1;
  return start + needed > length ? start : length;
}

/**
 * Which bytes of a chunk to hand out now: up to the last newline; the whole chunk (minus a trailing partial
 * character) when it is full and holds no newline (one very long line); everything complete when
 * `includePartialLine` (the job has ended, nothing more will follow the last line).
 */
export function consumableLength(chunk: Uint8Array, maxBytes: number, includePartialLine: boolean): number {
  if (chunk.length === 0) return 0;
  const complete = completeUtf8Length(chunk);
  if (includePartialLine) return complete;
  const lastNewline = chunk.lastIndexOf(0x0a);
  if (lastNewline >= 0) return lastNewline + 1;
  if (chunk.length >= maxBytes) return complete > 0 ? complete : chunk.length;
  return 0;
}

const decoder = new TextDecoder("utf-8");

/** The bytes of one chunk to hand out, decoded, and the offset to read from next time. */
function chunkFrom(
  bytes: Buffer | null,
  offsetBytes: number,
  limit: number,
  includePartialLine: boolean,
): LogChunk {
  if (!bytes) return { text: "", nextOffsetBytes: offsetBytes };
  const take = consumableLength(bytes, limit, includePartialLine);
  return { text: decoder.decode(bytes.subarray(0, take)), nextOffsetBytes: offsetBytes + take };
}

function checkOffset(offsetBytes: number): void {
  if (!Number.isSafeInteger(offsetBytes) || offsetBytes < 0) throw new Error(`bad log offset ${offsetBytes}`);
}

/**
 * Reads a log from `offsetBytes` over SFTP (a ranged read: no remote command, nothing forked on the
 * host). A missing file reads as empty: the job may not have started writing yet.
 */
export async function readLogFrom(
  session: RemoteSession,
  path: string,
  offsetBytes: number,
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogChunk> {
  checkOffset(offsetBytes);
  const limit = Math.max(MAX_UTF8_BYTES, Math.trunc(maxBytes));
  const bytes = await session.readRange(path, offsetBytes, limit);
  return chunkFrom(bytes, offsetBytes, limit, options.includePartialLine ?? false);
}

export type LogRequest = { path: string; offsetBytes: number };

/**
 * readLogFrom for many logs of one host at once: the reads share the connection's SFTP channel and are
 * in flight together, so following N running jobs costs about one round trip and no remote command.
 */
export async function readLogsFrom(
  session: RemoteSession,
  requests: LogRequest[],
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogChunk[]> {
  return Promise.all(
    requests.map((request) => readLogFrom(session, request.path, request.offsetBytes, maxBytes, options)),
  );
}

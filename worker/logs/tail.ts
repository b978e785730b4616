/**
 * Reads a job's log by byte offset, the way the poller follows it: each call returns the bytes after
 * `offsetBytes` that may be handed out now and the offset to ask from next time, so no line is lost,
 * doubled or cut in two across polls. The bytes are kept exactly as the host holds them (invalid UTF-8,
 * carriage returns, colour escapes and all); a decoded copy is for reading lines, never for storing.
 */
import type { RemoteSession } from "../ssh/session";

export const DEFAULT_LOG_CHUNK_BYTES = 256 * 1024;
/** The longest UTF-8 encoding of one character (RFC 3629 §3). */
const MAX_UTF8_BYTES = 4;

export type LogChunk = { text: string; nextOffsetBytes: number };
/**
 * `bytes`: what to hand out now, exactly as read. `endOfFile`: the read stopped at the end of the file
 * as it was then (fewer bytes than asked for), and every byte read was handed out.
 */
export type LogBytes = { bytes: Buffer; nextOffsetBytes: number; endOfFile: boolean };

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
 * character) when it is full and holds no newline (one very long line), so a character is never split
 * between two chunks. When `includePartialLine` (the job has ended, nothing more will follow the last
 * line) and the read reached the end of the file: everything, a trailing byte sequence that is not a
 * whole character included, as the job left it. A full read is cut the same way either way, so output
 * rules see whole lines.
 */
export function consumableLength(chunk: Uint8Array, maxBytes: number, includePartialLine: boolean): number {
  if (chunk.length === 0) return 0;
  const full = chunk.length >= maxBytes;
  if (includePartialLine && !full) return chunk.length;
  const lastNewline = chunk.lastIndexOf(0x0a);
  if (lastNewline >= 0) return lastNewline + 1;
  if (!full) return 0;
  const complete = completeUtf8Length(chunk);
  return complete > 0 ? complete : chunk.length;
}

/** The bytes of one read to hand out and the offset to read from next time. */
export function logBytesFrom(
  bytes: Buffer | null,
  offsetBytes: number,
  limit: number,
  includePartialLine: boolean,
): LogBytes {
  if (!bytes) return { bytes: Buffer.alloc(0), nextOffsetBytes: offsetBytes, endOfFile: true };
  const take = consumableLength(bytes, limit, includePartialLine);
  return {
    bytes: bytes.subarray(0, take),
    nextOffsetBytes: offsetBytes + take,
    endOfFile: bytes.length < limit && take === bytes.length,
  };
}

/**
 * The text of log bytes for reading lines (output rules): invalid bytes become U+FFFD. A copy for
 * parsing only; the bytes themselves are what is stored.
 */
export function decodeLogText(bytes: Uint8Array): string {
  return new TextDecoder("utf-8").decode(bytes);
}

function checkOffset(offsetBytes: number): void {
  if (!Number.isSafeInteger(offsetBytes) || offsetBytes < 0) throw new Error(`bad log offset ${offsetBytes}`);
}

/**
 * Reads a log's bytes from `offsetBytes` over SFTP (a ranged read: no remote command, nothing forked on
 * the host). A missing file reads as empty: the job may not have started writing yet.
 */
export async function readLogBytesFrom(
  session: RemoteSession,
  path: string,
  offsetBytes: number,
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogBytes> {
  checkOffset(offsetBytes);
  const limit = Math.max(MAX_UTF8_BYTES, Math.trunc(maxBytes));
  const bytes = await session.readRange(path, offsetBytes, limit);
  return logBytesFrom(bytes, offsetBytes, limit, options.includePartialLine ?? false);
}

/** readLogBytesFrom with the bytes decoded (invalid bytes become U+FFFD), for reading lines. */
export async function readLogFrom(
  session: RemoteSession,
  path: string,
  offsetBytes: number,
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogChunk> {
  const chunk = await readLogBytesFrom(session, path, offsetBytes, maxBytes, options);
  return { text: decodeLogText(chunk.bytes), nextOffsetBytes: chunk.nextOffsetBytes };
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

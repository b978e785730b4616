/**
 * Reads a job's log by byte offset, the way the poller follows it: each call returns the complete lines
 * after `offsetBytes` and the offset to ask from next time, so no line is lost, doubled or cut in two
 * across polls. Offsets count bytes, not characters: UTF-8 text is never decoded from half a character.
 */
import { RemoteCommandError } from "../ssh/errors";
import { shellScript } from "../ssh/quote";
import type { RemoteSession } from "../ssh/session";

export const DEFAULT_LOG_CHUNK_BYTES = 256 * 1024;
/** The longest UTF-8 encoding of one character (RFC 3629 §3). */
const MAX_UTF8_BYTES = 4;

/* $1 = path, $2 = first byte (1-based, as tail -c +N counts), $3 = most bytes. A missing file prints nothing. */
const READ_SCRIPT = `[ -f "$1" ] || exit 0
tail -c +"$2" -- "$1" | head -c "$3"`;

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

export async function readLogFrom(
  session: RemoteSession,
  path: string,
  offsetBytes: number,
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogChunk> {
  if (!Number.isSafeInteger(offsetBytes) || offsetBytes < 0) throw new Error(`bad log offset ${offsetBytes}`);
  const limit = Math.max(MAX_UTF8_BYTES, Math.trunc(maxBytes));
  const argv = shellScript(READ_SCRIPT, [path, String(offsetBytes + 1), String(limit)]);
  const result = await session.exec(argv, { maxOutputBytes: limit + 64 * 1024 });
  // tail's failure (unreadable file) is hidden by the pipe's status; its message is not.
  if (result.code !== 0 || (result.stdout.length === 0 && result.stderr.length > 0)) {
    throw new RemoteCommandError(`tail -c +${offsetBytes + 1} -- ${path}`, result.code, result.stderr);
  }
  const chunk = result.stdout;
  const take = consumableLength(chunk, limit, options.includePartialLine ?? false);
  return { text: decoder.decode(chunk.subarray(0, take)), nextOffsetBytes: offsetBytes + take };
}

/*
 * $1 = most bytes per file, then pairs of (path, first byte 1-based). For each file one record:
 * "@<index> <count>\n", <count> bytes, "\n"; "@<index> -\n" when the file is missing. The count is fixed
 * before the bytes are read (logs only grow, so `head -c` then delivers exactly that many).
 */
const READ_MANY_SCRIPT = `max=$1; shift; i=0
while [ $# -ge 2 ]; do
  f=$1; start=$2; shift 2
  if [ -f "$f" ]; then
    size=$(wc -c < "$f")
    n=$((size - start + 1)); [ "$n" -lt 0 ] && n=0; [ "$n" -gt "$max" ] && n=$max
    printf '@%s %s\\n' "$i" "$n"
    [ "$n" -gt 0 ] && tail -c +"$start" -- "$f" | head -c "$n"
    printf '\\n'
  else
    printf '@%s -\\n' "$i"
  fi
  i=$((i + 1))
done`;

export type LogRequest = { path: string; offsetBytes: number };

/** Splits READ_MANY_SCRIPT output into one chunk (or null for a missing file) per request. */
export function parseLogRecords(output: Buffer, count: number): Array<Buffer | null> {
  const chunks: Array<Buffer | null> = [];
  let position = 0;
  for (let index = 0; index < count; index += 1) {
    const headerEnd = output.indexOf(0x0a, position);
    const header = headerEnd < 0 ? "" : output.toString("latin1", position, headerEnd);
    const match = /^@(\d+) (\d+|-)$/.exec(header);
    if (!match || Number(match[1]) !== index) throw new Error(`log batch out of step at record ${index}`);
    position = headerEnd + 1;
    if (match[2] === "-") {
      chunks.push(null);
      continue;
    }
    const length = Number(match[2]);
    if (output[position + length] !== 0x0a)
      throw new Error(`log batch: record ${index} is shorter than announced`);
    chunks.push(output.subarray(position, position + length));
    position += length + 1;
  }
  return chunks;
}

/**
 * readLogFrom for many logs of one host in a single remote command: the poller's per-host batch, so
 * following N running jobs costs one round trip instead of N.
 */
export async function readLogsFrom(
  session: RemoteSession,
  requests: LogRequest[],
  maxBytes: number = DEFAULT_LOG_CHUNK_BYTES,
  options: { includePartialLine?: boolean } = {},
): Promise<LogChunk[]> {
  if (requests.length === 0) return [];
  const limit = Math.max(MAX_UTF8_BYTES, Math.trunc(maxBytes));
  const args = [String(limit)];
  for (const request of requests) {
    if (!Number.isSafeInteger(request.offsetBytes) || request.offsetBytes < 0) {
      throw new Error(`bad log offset ${request.offsetBytes}`);
    }
    args.push(request.path, String(request.offsetBytes + 1));
  }
  const result = await session.exec(shellScript(READ_MANY_SCRIPT, args), {
    maxOutputBytes: requests.length * (limit + 64) + 64 * 1024,
  });
  if (result.code !== 0) throw new RemoteCommandError("read logs", result.code, result.stderr);
  const chunks = parseLogRecords(result.stdout, requests.length);
  return requests.map((request, index) => {
    const chunk = chunks[index];
    if (!chunk) return { text: "", nextOffsetBytes: request.offsetBytes };
    const take = consumableLength(chunk, limit, options.includePartialLine ?? false);
    return { text: decoder.decode(chunk.subarray(0, take)), nextOffsetBytes: request.offsetBytes + take };
  });
}

/**
 * A run's log arrives as chunks of bytes (base64 in the HTTP API), exactly as the job wrote them; the page
 * shows them as text. One UTF-8 decoder runs across the chunks of a fetch (`stream: true`), so a
 * character is decoded whole wherever a chunk boundary falls, and bytes that are not UTF-8 show as U+FFFD
 * (the WHATWG Encoding Standard's decoder). Between fetches, the bytes the decoder still holds (the start
 * of a character whose rest has not arrived) are kept as `pendingBytes` and fed first next time, so the
 * text held in the query cache is plain data and an abandoned fetch leaves it untouched.
 */

export type LogText = {
  /** The log decoded so far. */
  text: string;
  /** The sequence number of the last chunk decoded (0 before the first). */
  lastSeq: number;
  /** Trailing bytes of an unfinished character, decoded with the next chunk. */
  pendingBytes: Uint8Array;
  /** The run is final and every stored chunk is decoded. */
  done: boolean;
};

export const EMPTY_LOG_TEXT: LogText = { text: "", lastSeq: 0, pendingBytes: new Uint8Array(0), done: false };

/** The bytes of a base64 string (RFC 4648 §4), as the log API sends them. */
export function bytesFromBase64(base64: string): Uint8Array {
  const binary = atob(base64);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i += 1) bytes[i] = binary.charCodeAt(i);
  return bytes;
}

/**
 * How many trailing bytes a streaming UTF-8 decoder holds back after `bytes`: the start of a sequence
 * that is valid so far but not finished. Follows the WHATWG Encoding Standard's UTF-8 decoder: leads
 * C2–DF, E0–EF, F0–F4 announce 2, 3, 4 bytes; continuations are 80–BF, except the byte after E0 (A0–BF),
 * ED (80–9F), F0 (90–BF) and F4 (80–8F). Anything else the decoder has already replaced by U+FFFD.
 */
export function heldUtf8Length(bytes: Uint8Array): number {
  for (let held = 1; held <= 3 && held <= bytes.length; held += 1) {
    const start = bytes.length - held;
    const lead = bytes[start]!;
    const length =
      lead >= 0xc2 && lead <= 0xdf
        ? 2
        : lead >= 0xe0 && lead <= 0xef
          ? 3
          : lead >= 0xf0 && lead <= 0xf4
            ? 4
            : 0;
    if (length === 0) continue;
    if (length <= held) return 0;
    const lower = lead === 0xe0 ? 0xa0 : lead === 0xf0 ? 0x90 : 0x80;
    const upper = lead === 0xed ? 0x9f : lead === 0xf4 ? 0x8f : 0xbf;
    for (let i = start + 1; i < bytes.length; i += 1) {
      const byte = bytes[i]!;
      if (i === start + 1 ? byte < lower || byte > upper : byte < 0x80 || byte > 0xbf) return 0;
    }
    return held;
  }
  return 0;
}

/**
 * The log text after decoding `chunks` (bytes in sequence order) after `held`. When `done`, the decoder is
 * flushed: an unfinished character at the very end of the log shows as U+FFFD.
 */
export function appendLogChunks(
  held: LogText,
  chunks: readonly Uint8Array[],
  lastSeq: number,
  done: boolean,
): LogText {
  const decoder = new TextDecoder("utf-8");
  const parts = [decoder.decode(held.pendingBytes, { stream: true })];
  // The last bytes seen, to tell which of them the decoder holds: a held sequence is at most 3 bytes.
  let tail = held.pendingBytes;
  for (const chunk of chunks) {
    parts.push(decoder.decode(chunk, { stream: true }));
    tail = lastBytes(tail, chunk, 3);
  }
  if (done) {
    parts.push(decoder.decode());
    return { text: held.text + parts.join(""), lastSeq, pendingBytes: new Uint8Array(0), done: true };
  }
  const pendingBytes = tail.slice(tail.length - heldUtf8Length(tail));
  return { text: held.text + parts.join(""), lastSeq, pendingBytes, done: false };
}

/** The last `count` bytes of `before` followed by `after`. */
function lastBytes(before: Uint8Array, after: Uint8Array, count: number): Uint8Array {
  if (after.length >= count) return after.subarray(after.length - count);
  const joined = new Uint8Array(Math.min(count, before.length + after.length));
  const fromBefore = joined.length - after.length;
  joined.set(before.subarray(before.length - fromBefore), 0);
  joined.set(after, fromBefore);
  return joined;
}

/**
 * Where the poller cuts a job's log into chunks (worker/logs/tail.ts), on bytes: after the last newline,
 * a full line-less read whole but never inside a character, everything once the job has ended. The
 * chunks joined are the file, byte for byte, whatever it holds. UTF-8 sequence lengths from RFC 3629 §3
 * (é = C3 A9, € = E2 82 AC, 😀 = F0 9F 98 80).
 */
import { describe, expect, it } from "vitest";
import {
  consumableLength,
  decodeLogText,
  logBytesFrom,
  readLogBytesFrom,
  readLogFrom,
} from "../../../worker/logs/tail";
import type { RemoteSession } from "../../../worker/ssh/session";

const bytes = (...parts: (string | number[])[]) =>
  Buffer.concat(
    parts.map((part) => (typeof part === "string" ? Buffer.from(part, "utf8") : Buffer.from(part))),
  );

/** A session whose only file is `content` (readRange as SFTP answers it: fewer bytes at the end). */
function fileSession(content: () => Buffer | null): RemoteSession {
  return {
    readRange: async (_path: string, offsetBytes: number, maxBytes: number) => {
      const file = content();
      return file ? file.subarray(offsetBytes, offsetBytes + maxBytes) : null;
    },
  } as unknown as RemoteSession;
}

/** Follows a file the way the poller does, `readBytes` per read, and returns the chunks handed out. */
async function follow(file: Buffer, readBytes: number, ended: boolean): Promise<Buffer[]> {
  const session = fileSession(() => file);
  const chunks: Buffer[] = [];
  let offset = 0;
  for (let round = 0; round < 100_000; round += 1) {
    const chunk = await readLogBytesFrom(session, "job.log", offset, readBytes, {
      includePartialLine: ended,
    });
    if (chunk.bytes.length === 0) break;
    expect(chunk.nextOffsetBytes).toBe(offset + chunk.bytes.length);
    chunks.push(Buffer.from(chunk.bytes));
    offset = chunk.nextOffsetBytes;
    if (chunk.endOfFile) break;
  }
  return chunks;
}

describe("cutting a log into chunks", () => {
  it("cuts after the last newline while the job runs, and holds back an unfinished line", () => {
    expect(consumableLength(bytes("one\r\ntwo\nthr"), 100, false)).toBe(9);
    expect(consumableLength(bytes("no newline yet"), 100, false)).toBe(0);
    const read = logBytesFrom(bytes("one\ntwo"), 40, 100, false);
    expect(read.bytes).toEqual(bytes("one\n"));
    expect(read.nextOffsetBytes).toBe(44);
    // Bytes after the cut wait for the next poll: this read is not the end of what the file holds.
    expect(read.endOfFile).toBe(false);
  });

  it("hands out a full read with no newline whole, minus a character cut at its end", () => {
    // 7 bytes asked for: "ab" + é (2) + the first 3 of 😀's 4 bytes → the 4 complete bytes only.
    expect(consumableLength(bytes("abé😀").subarray(0, 7), 7, false)).toBe(4);
    expect(consumableLength(bytes("abcdefg"), 7, false)).toBe(7);
    // € cut after its first byte at the end of a full read: held back.
    expect(consumableLength(bytes("abcd", [0xe2]), 5, false)).toBe(4);
  });

  it("keeps invalid bytes, carriage returns and colour escapes as they are", () => {
    const raw = bytes("\u001b[31mred\u001b[0m 50%\r100%\r\n", [0xff, 0xfe], " tail\n");
    const read = logBytesFrom(raw, 0, 1024, false);
    expect(read.bytes).toEqual(raw);
    expect(read.endOfFile).toBe(true);
    // Only the decoded copy for output rules replaces invalid bytes (WHATWG UTF-8 decoder: one U+FFFD each).
    expect(decodeLogText(read.bytes)).toBe("\u001b[31mred\u001b[0m 50%\r100%\r\n\ufffd\ufffd tail\n");
  });

  it("takes everything once the job has ended, an unfinished last line and stray bytes too", () => {
    const raw = bytes("done\nlast line", [0xe2, 0x82]);
    expect(consumableLength(raw, 1024, true)).toBe(raw.length);
    const read = logBytesFrom(raw, 0, 1024, true);
    expect(read.bytes).toEqual(raw);
    expect(read.endOfFile).toBe(true);
    // A full read after the end is not the end of the file: cut as while the job ran, the rest next.
    expect(consumableLength(bytes("ab\ncd"), 5, true)).toBe(3);
    expect(consumableLength(bytes("abc", [0xf0, 0x9f]), 5, true)).toBe(3);
  });

  it("reads a missing log as empty and at its end", async () => {
    const chunk = await readLogBytesFrom(
      fileSession(() => null),
      "job.log",
      12,
    );
    expect(chunk).toEqual({ bytes: Buffer.alloc(0), nextOffsetBytes: 12, endOfFile: true });
    expect(
      await readLogFrom(
        fileSession(() => null),
        "job.log",
        12,
      ),
    ).toEqual({ text: "", nextOffsetBytes: 12 });
  });

  it("joins back to the file byte for byte, with no character split between chunks", async () => {
    // A seeded mix (xorshift32, seed 2026) of ASCII, é, 😀, CR, colour escapes, long lines and bad bytes.
    let state = 2026;
    const random = () => {
      state ^= state << 13;
      state ^= state >>> 17;
      state ^= state << 5;
      return (state >>> 0) / 2 ** 32;
    };
    const pieces: Buffer[] = [];
    for (let i = 0; i < 4000; i += 1) {
      const pick = random();
      if (pick < 0.3) pieces.push(bytes("line ", String(i), "\n"));
      else if (pick < 0.45) pieces.push(bytes("é".repeat(1 + Math.floor(random() * 9))));
      else if (pick < 0.6) pieces.push(bytes("😀".repeat(1 + Math.floor(random() * 5))));
      else if (pick < 0.7) pieces.push(bytes(`${Math.floor(random() * 100)}%\r`));
      else if (pick < 0.8) pieces.push(bytes("\u001b[32mok\u001b[0m "));
      else if (pick < 0.85) pieces.push(bytes([0xff, 0xfe]));
      else if (pick < 0.87) pieces.push(bytes("x".repeat(300 + Math.floor(random() * 400))));
      else pieces.push(bytes("plain text "));
    }
    const file = Buffer.concat(pieces);
    const valid = Buffer.concat(pieces.filter((piece) => !piece.equals(bytes([0xff, 0xfe]))));
    for (const readBytes of [4, 5, 7, 64, 251, 4096]) {
      const chunks = await follow(file, readBytes, true);
      expect(Buffer.concat(chunks).equals(file)).toBe(true);
      // On valid UTF-8 every chunk decodes on its own without U+FFFD: no character was cut in two.
      const validChunks = await follow(valid, readBytes, true);
      expect(Buffer.concat(validChunks).equals(valid)).toBe(true);
      for (const chunk of validChunks) expect(decodeLogText(chunk)).not.toContain("\ufffd");
    }
  });

  it("while the job runs hands out the file up to its last newline, and the rest once it has ended", async () => {
    const file = bytes("first é\n", "second 😀\r\n", "unfinished 😀");
    const running = Buffer.concat(await follow(file, 64, false));
    expect(running).toEqual(bytes("first é\n", "second 😀\r\n"));
    const session = fileSession(() => file);
    const rest = await readLogBytesFrom(session, "job.log", running.length, 1024, {
      includePartialLine: true,
    });
    expect(Buffer.concat([running, rest.bytes])).toEqual(file);
    expect(rest.endOfFile).toBe(true);
  });
});

/**
 * A run's log on its page: chunks of bytes decoded as one UTF-8 stream however the chunks and the
 * refreshes cut it (src/features/runs/log-text.ts), and the link that downloads the bytes themselves.
 * The reference for every decoding is the WHATWG Encoding Standard's UTF-8 decoder as the platform's
 * TextDecoder implements it, run once over the whole log. UTF-8 sequences from RFC 3629 §3.
 */
import { screen, waitFor } from "@testing-library/react";
import { describe, expect, it } from "vitest";
import {
  appendLogChunks,
  bytesFromBase64,
  EMPTY_LOG_TEXT,
  heldUtf8Length,
  type LogText,
} from "@/features/runs/log-text";
import { installFakeApi } from "./support/fake-api";
import { KESTREL_ID, kestrel, people } from "./support/fixtures";
import { renderApp } from "./support/render-app";
import { kestrelRuns, RUN_IDS } from "./support/run-fixtures";

const encode = (text: string) => new TextEncoder().encode(text);
const concat = (parts: Uint8Array[]) => {
  const joined = new Uint8Array(parts.reduce((sum, part) => sum + part.length, 0));
  let at = 0;
  for (const part of parts) {
    joined.set(part, at);
    at += part.length;
  }
  return joined;
};

/** Cuts `bytes` at the given offsets. */
const cut = (bytes: Uint8Array, at: number[]) =>
  [0, ...at, bytes.length].slice(1).map((end, i) => bytes.subarray([0, ...at][i]!, end));

describe("decoding a log across chunks", () => {
  it("decodes characters cut between chunks and between refreshes whole", () => {
    // "é" = C3 A9, "😀" = F0 9F 98 80: cut after C3, and after F0 9F.
    const bytes = encode("café 😀\n");
    const [a, b, c] = cut(bytes, [4, 8]);
    const first = appendLogChunks(EMPTY_LOG_TEXT, [a!], 1, false);
    expect(first.text).toBe("caf");
    expect(Array.from(first.pendingBytes)).toEqual([0xc3]);
    const second = appendLogChunks(first, [b!], 2, false);
    expect(second.text).toBe("café ");
    expect(Array.from(second.pendingBytes)).toEqual([0xf0, 0x9f]);
    const third = appendLogChunks(second, [c!], 3, true);
    expect(third).toEqual({ text: "café 😀\n", lastSeq: 3, pendingBytes: new Uint8Array(0), done: true });
  });

  it("shows bytes that are not UTF-8 as U+FFFD, and an unfinished last character once the log is complete", () => {
    const bytes = concat([
      encode("ok "),
      Uint8Array.from([0xff, 0xfe]),
      encode(" \r\u001b[1mbold"),
      Uint8Array.from([0xe2, 0x82]),
    ]);
    const open = appendLogChunks(EMPTY_LOG_TEXT, [bytes], 1, false);
    expect(open.text).toBe("ok \ufffd\ufffd \r\u001b[1mbold");
    const closed = appendLogChunks(open, [], 1, true);
    expect(closed.text).toBe(new TextDecoder().decode(bytes));
  });

  it("tells which trailing bytes the decoder holds (WHATWG UTF-8 decoder's bounds)", () => {
    expect(heldUtf8Length(Uint8Array.from([0x61, 0xe2, 0x82]))).toBe(2);
    expect(heldUtf8Length(Uint8Array.from([0xf0, 0x9f, 0x98]))).toBe(3);
    expect(heldUtf8Length(Uint8Array.from([0xe2, 0x82, 0xac]))).toBe(0);
    // E0 must be followed by A0–BF, ED by 80–9F: E0 80 and ED A0 are already errors, nothing is held.
    expect(heldUtf8Length(Uint8Array.from([0xe0, 0x80]))).toBe(0);
    expect(heldUtf8Length(Uint8Array.from([0xed, 0xa0]))).toBe(0);
    expect(heldUtf8Length(Uint8Array.from([0xc0]))).toBe(0);
    expect(heldUtf8Length(Uint8Array.from([0xf5]))).toBe(0);
  });

  it("matches one decoding of the whole log for any cuts (seeded random logs)", () => {
    // xorshift32, seed 7: logs drawn from ASCII, multi-byte characters, lone continuation bytes, bytes
    // never valid in UTF-8, and sequences broken after their lead byte.
    let state = 7;
    const random = () => {
      state ^= state << 13;
      state ^= state >>> 17;
      state ^= state << 5;
      return (state >>> 0) / 2 ** 32;
    };
    const alphabet = [
      encode("a"),
      encode("\n"),
      encode("\r"),
      encode("é"),
      encode("€"),
      encode("😀"),
      Uint8Array.from([0x80]),
      Uint8Array.from([0xff]),
      Uint8Array.from([0xe2, 0x41]),
      Uint8Array.from([0xf0, 0x9f, 0x0a]),
      Uint8Array.from([0xe0, 0x80]),
      Uint8Array.from([0xed, 0xa0, 0x80]),
    ];
    for (let trial = 0; trial < 300; trial += 1) {
      const parts = Array.from(
        { length: 1 + Math.floor(random() * 40) },
        () => alphabet[Math.floor(random() * alphabet.length)]!,
      );
      const bytes = concat(parts);
      const cuts = Array.from({ length: Math.floor(random() * 8) }, () =>
        Math.floor(random() * (bytes.length + 1)),
      ).sort((x, y) => x - y);
      const chunks = cut(bytes, cuts);
      let held: LogText = EMPTY_LOG_TEXT;
      let seq = 0;
      while (seq < chunks.length) {
        const take = 1 + Math.floor(random() * 3);
        const batch = chunks.slice(seq, seq + take);
        seq += batch.length;
        held = appendLogChunks(held, batch, seq, seq === chunks.length);
      }
      if (!held.done) held = appendLogChunks(held, [], seq, true);
      expect(held.text).toBe(new TextDecoder().decode(bytes));
    }
  });

  it("reads base64 as the server writes it (RFC 4648)", () => {
    expect(Array.from(bytesFromBase64("w6nwn5iA/w=="))).toEqual([0xc3, 0xa9, 0xf0, 0x9f, 0x98, 0x80, 0xff]);
  });
});

describe("the log on a run's page", () => {
  it("shows chunks cut inside characters as whole text and links to the whole log's bytes", async () => {
    const bytes = encode("[sigmaflow] stage 1/2 inner: start\nénergie 😀 symmetry A' done in 41.5 s\n");
    // Cuts inside é (after its first byte) and inside 😀 (after two of its four bytes).
    const e = bytes.indexOf(0xc3);
    const smile = bytes.indexOf(0xf0);
    installFakeApi({
      me: people.tomas,
      groups: [{ ...kestrel, myRole: "member" }],
      runs: { [KESTREL_ID]: kestrelRuns() },
      logs: { [RUN_IDS.done]: cut(bytes, [e + 1, smile + 2]) },
    });
    renderApp(`/groups/${KESTREL_ID}/runs/${RUN_IDS.done}`);
    await waitFor(() =>
      expect(screen.getByTestId("run-log")).toHaveTextContent("énergie 😀 symmetry A' done in 41.5 s"),
    );
    expect(screen.getByTestId("run-log")).not.toHaveTextContent("\ufffd");
    const download = screen.getByRole("link", { name: "Download the whole log" });
    expect(download.getAttribute("href")).toMatch(new RegExp(`/api/runs/${RUN_IDS.done}/log/raw$`));
  });
});

/**
 * A job whose log is hard to carry byte for byte: 200 000 lines of multi-byte UTF-8 (é = 2 bytes,
 * 😀 = 4 bytes, RFC 3629 §3), lines of 100 kB and one longer than a poll's read (worker/steps/poll.ts reads
 * 256 KiB per round), carriage returns, ANSI colour escapes, bytes that are not UTF-8 at all, and a last
 * line cut inside a 😀 with no newline. The tests that use it compare what Sigmaflow delivers with the
 * job's log file on the host by length and sha256.
 */
import { createHash } from "node:crypto";
import { expect } from "vitest";
import { shellCode, uniqueCodeName } from "./code-fixtures";

/** The long line: "x" and 80 000 😀, so a 256 KiB read from its start ends 3 bytes into a 😀. */
export const LONG_LINE_EMOJI = 80_000;

/**
 * The job: python3 writes the log in 10 batches of 20 000 lines, `pause` seconds apart, so polls store
 * it in pieces while it runs and the rest once it has ended. No braces but the parameter's: the script
 * is a template.
 */
export const HOSTILE_LOG_SCRIPT = `/usr/bin/python3 - <<'PYEOF'
import sys, time
out = sys.stdout.buffer
e = "\\u00e9".encode()
smile = "\\U0001F600".encode()
esc = b"\\x1b"
n = 0
for batch in range(10):
    parts = []
    for i in range(20000):
        n += 1
        k = n % 7
        if k == 0:
            parts.append(b"ligne %d " % n + e * (n % 13) + b"nergie\\n")
        elif k == 1:
            parts.append(b"smile %d " % n + smile * (n % 5) + b"\\n")
        elif k == 2:
            parts.append(b"progress %d%%\\r" % (n % 100) + b"done\\r\\n")
        elif k == 3:
            parts.append(esc + b"[32mgreen %d" % n + esc + b"[0m\\n")
        elif k == 4 and n % 1000 == 4:
            parts.append(b"bad \\xff\\xfe bytes and a cut \\xe2\\x82 sequence %d\\n" % n)
        else:
            parts.append(b"plain line %d\\n" % n)
    if batch in (2, 5, 8):
        parts.append(b"y" + e * 50000 + b"\\n")
    if batch == 6:
        parts.append(b"x" + smile * ${LONG_LINE_EMOJI} + b"\\n")
    out.write(b"".join(parts))
    out.flush()
    time.sleep({{ pause }})
out.write(b"the end, with no newline " + smile[:2])
out.flush()
PYEOF
`;

/** The code of the job, with its one parameter `pause` (seconds between batches, 0 to 2). */
export function hostileLogCode(prefix: string) {
  return shellCode({
    name: uniqueCodeName(prefix),
    script: HOSTILE_LOG_SCRIPT,
    parameters: {
      type: "object",
      properties: { pause: { type: "number", minimum: 0, maximum: 2 } },
      required: ["pause"],
      additionalProperties: false,
    },
  });
}

export const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/** The job really wrote what the tests are about: each kind of hostile byte is in its log file. */
export function expectHostileLog(file: Buffer) {
  expect(file.length).toBeGreaterThan(4 * 1024 * 1024);
  expect(file.includes(Buffer.from([0xff, 0xfe]))).toBe(true);
  expect(file.includes(Buffer.from([0xe2, 0x82, 0x20]))).toBe(true);
  expect(file.includes(Buffer.from("\r\n"))).toBe(true);
  expect(file.includes(Buffer.from("\u001b[32m"))).toBe(true);
  expect(file.includes(Buffer.from(`x${"😀".repeat(LONG_LINE_EMOJI)}\n`))).toBe(true);
  // The job's last bytes: a cut 😀 with no newline (Sigmaflow's own closing line follows in job.log).
  const cutEnd = Buffer.concat([Buffer.from("the end, with no newline "), Buffer.from("😀").subarray(0, 2)]);
  expect(file.includes(cutEnd)).toBe(true);
}

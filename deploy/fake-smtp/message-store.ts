/**
 * Received mail, newest first, in memory; optionally mirrored as one JSON file per message in a
 * directory so the development inbox survives a restart.
 */
import { mkdir, readdir, readFile, rename, unlink, writeFile } from "node:fs/promises";
import path from "node:path";
import { z } from "zod";

export const storedMessageSchema = z.object({
  /** UUID; also the file name, so it must never contain path characters. */
  id: z.uuid(),
  receivedAt: z.iso.datetime(),
  /** The From header as written, or the envelope sender when the header is missing. */
  from: z.string(),
  /** Envelope recipients (RCPT TO), which include Bcc. */
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  /** Decoded headers worth showing, in display order. */
  headers: z.array(z.tuple([z.string(), z.string()])),
});

export type StoredMessage = z.infer<typeof storedMessageSchema>;

function newestFirst(a: StoredMessage, b: StoredMessage): number {
  return b.receivedAt.localeCompare(a.receivedAt);
}

export class MessageStore {
  private messages: StoredMessage[] = [];

  constructor(private readonly storeDir?: string) {}

  /** Reads earlier messages from the store directory; files that do not parse are skipped. */
  async load(): Promise<void> {
    if (!this.storeDir) return;
    await mkdir(this.storeDir, { recursive: true });
    const loaded: StoredMessage[] = [];
    for (const name of await readdir(this.storeDir)) {
      if (!name.endsWith(".json")) continue;
      try {
        const raw: unknown = JSON.parse(await readFile(path.join(this.storeDir, name), "utf8"));
        loaded.push(storedMessageSchema.parse(raw));
      } catch (error) {
        console.warn(`fake-smtp: skipping unreadable message file ${name}`, error);
      }
    }
    this.messages = loaded.sort(newestFirst);
  }

  async add(message: StoredMessage): Promise<void> {
    if (this.storeDir) {
      // Write then rename, so a crash never leaves half a file for the next load.
      const target = this.filePath(message.id);
      await writeFile(`${target}.tmp`, JSON.stringify(message, null, 2), "utf8");
      await rename(`${target}.tmp`, target);
    }
    this.messages.unshift(message);
  }

  /** Messages newest first; `to` keeps those with that envelope recipient (case-insensitive). */
  list(filter: { to?: string } = {}): StoredMessage[] {
    const wanted = filter.to?.toLowerCase();
    if (!wanted) return [...this.messages];
    return this.messages.filter((message) => message.to.some((address) => address.toLowerCase() === wanted));
  }

  get(id: string): StoredMessage | undefined {
    return this.messages.find((message) => message.id === id);
  }

  /** Removes every message; returns how many there were. */
  async clear(): Promise<number> {
    const removed = this.messages;
    this.messages = [];
    if (this.storeDir) {
      // A file already gone is what we want anyway.
      await Promise.all(removed.map((message) => unlink(this.filePath(message.id)).catch(() => undefined)));
    }
    return removed.length;
  }

  private filePath(id: string): string {
    if (!this.storeDir) throw new Error("no store directory configured");
    return path.join(this.storeDir, `${id}.json`);
  }
}

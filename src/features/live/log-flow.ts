/**
 * Flow control between the live feed and the terminal. The terminal parses what it is given
 * asynchronously; `write`'s callback says when a piece is processed. Bytes given and not yet processed
 * are "pending". Above the high watermark nothing more is written: chunks wait here unacknowledged, so
 * the server's send budget fills and it pauses the feed (`run:paused`) instead of flooding the tab. Below
 * the low watermark the waiting chunks are written, and once all of them are, a paused feed is resumed
 * from the last sequence number held.
 */

/** Pending bytes above which chunks wait (the terminal is busy). */
export const HIGH_WATERMARK_BYTES = 500_000;
/** Pending bytes below which waiting chunks are written again. */
export const LOW_WATERMARK_BYTES = 100_000;

export type LogSink = { write: (data: Uint8Array, written: () => void) => void };

export class LogFlow {
  private pendingBytes = 0;
  private readonly waiting: { data: Uint8Array; ack: () => void }[] = [];
  /** Above the high watermark, until the pending bytes fall below the low one. */
  private stalled = false;
  private pausedByServer = false;
  private disposed = false;

  constructor(
    private readonly sink: LogSink,
    private readonly resume: () => void,
    private readonly watermarks = { highBytes: HIGH_WATERMARK_BYTES, lowBytes: LOW_WATERMARK_BYTES },
  ) {}

  /** Bytes given to the terminal and not processed yet. */
  pending(): number {
    return this.pendingBytes;
  }

  /** Chunks held back, not yet given to the terminal. */
  waitingChunks(): number {
    return this.waiting.length;
  }

  /** A chunk from the feed; `ack` is called once the terminal has processed its bytes. */
  accept(data: Uint8Array, ack: () => void): void {
    if (this.disposed) return;
    if (this.stalled || this.waiting.length > 0) this.waiting.push({ data, ack });
    else this.write(data, ack);
  }

  /** The server paused the feed: resume once everything held is written and the terminal has caught up. */
  paused(): void {
    this.pausedByServer = true;
    this.drain();
  }

  dispose(): void {
    this.disposed = true;
    this.waiting.length = 0;
  }

  private write(data: Uint8Array, ack: () => void) {
    this.pendingBytes += data.byteLength;
    if (this.pendingBytes >= this.watermarks.highBytes) this.stalled = true;
    this.sink.write(data, () => {
      if (this.disposed) return;
      this.pendingBytes -= data.byteLength;
      ack();
      this.drain();
    });
  }

  private drain() {
    if (this.stalled && this.pendingBytes < this.watermarks.lowBytes) this.stalled = false;
    while (!this.stalled && this.waiting.length > 0) {
      const next = this.waiting.shift()!;
      this.write(next.data, next.ack);
    }
    if (this.pausedByServer && !this.stalled && this.waiting.length === 0) {
      this.pausedByServer = false;
      this.resume();
    }
  }
}

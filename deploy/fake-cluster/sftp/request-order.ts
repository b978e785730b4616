/**
 * Orders the work of one SFTP session. Answers always leave in the order the requests arrived,
 * as from OpenSSH's sftp-server: OpenSSH's sftp and scp track the highest *contiguously*
 * acknowledged write and, on seeing acknowledgements out of order, truncate an in-place upload
 * there. Execution may overlap for READ and WRITE only, so a pipelined upload keeps several
 * writes in the thread pool at once; every other request is a barrier that starts after all
 * earlier requests finished and holds back all later ones, which keeps OPEN → WRITE → CLOSE →
 * RENAME sequences exactly as sequential as the client sent them. The one difference from a
 * strictly sequential server: overlapping WRITEs (or a READ of a range being written) pipelined
 * on one handle may take effect in either order; sftp, scp and ssh2's fastPut never send them.
 */
export type RequestKind = "io" | "barrier";

export class RequestOrder {
  /** Settles when the latest barrier has finished executing. */
  private barrier: Promise<unknown> = Promise.resolve();
  /** I/O requests started since the latest barrier. */
  private running = new Set<Promise<unknown>>();
  /** Settles when the latest answer has been delivered. */
  private delivered: Promise<void> = Promise.resolve();

  /**
   * `execute` must not reject (map errors to an answer first); `deliver` runs in arrival order.
   */
  schedule<T>(
    kind: RequestKind,
    execute: () => Promise<T>,
    deliver: (result: T) => Promise<void> | void,
  ): void {
    let result: Promise<T>;
    if (kind === "io") {
      result = this.barrier.then(execute);
      this.running.add(result);
      void result.finally(() => this.running.delete(result));
    } else {
      const earlier = [this.barrier, ...this.running];
      this.running = new Set();
      result = Promise.allSettled(earlier).then(execute);
      this.barrier = result;
    }
    // A delivery that throws must not wedge every later answer of the session.
    this.delivered = this.delivered.then(async () => deliver(await result)).catch(() => undefined);
  }

  /** Settles once every request scheduled so far has been executed and answered. */
  idle(): Promise<void> {
    return this.delivered;
  }
}

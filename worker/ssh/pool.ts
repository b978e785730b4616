/**
 * Pooled SSH connections per target. Connections open lazily, are shared by every operation with the
 * same target key, take new work least-busy first, and are replaced when they die. A per-connection
 * semaphore keeps the number of open channels below the server's session limit (OpenSSH MaxSessions,
 * default 10): opening one more would be refused with "Channel open failure". The persistent SFTP
 * channel holds one slot for as long as it is open.
 */
import type { SFTPWrapper } from "ssh2";
import { retryChannelOpen } from "./channel-retry";
import { type ConnectionTimings, PooledConnection, type SshTarget, targetSignature } from "./connection";
import { classifySshError, TransportError } from "./errors";
import { type RemoteSession, RemoteSessionImpl } from "./session";

export type { SshTarget } from "./connection";
export type { RemoteSession } from "./session";

export type SshPoolOptions = {
  maxConnectionsPerTarget?: number;
  /** Below OpenSSH's MaxSessions (10), leaving room for an administrator's own session multiplexed on ours. */
  maxChannelsPerConnection?: number;
  keepaliveIntervalMs?: number;
  keepaliveCountMax?: number;
  readyTimeoutMs?: number;
  /** A connection with nothing in flight for this long is closed (its SFTP channel with it). */
  idleCloseMs?: number;
};

export type SshPoolStats = {
  connections: number;
  perTarget: Record<string, number>;
  /** Channels open now over all connections (exec leases plus SFTP channels). */
  channelsInUse: number;
  /** The most channels any one connection has had open at once since the pool started. */
  peakChannelsPerConnection: number;
  /** Connections opened since the pool started (reuse keeps this small). */
  connectionsOpened: number;
};

type TargetGroup = {
  key: string;
  signature: string;
  connections: PooledConnection[];
  waiters: Array<() => void>;
};

/** A lease on one exec channel slot; `release` is idempotent. */
export type ChannelLease = { connection: PooledConnection; release: () => void };

export class SshPool {
  private readonly maxConnections: number;
  private readonly maxChannels: number;
  private readonly idleCloseMs: number;
  private readonly timings: ConnectionTimings;
  private readonly groups = new Map<string, TargetGroup>();
  private peakChannels = 0;
  private opened = 0;
  private closed = false;

  constructor(options: SshPoolOptions = {}) {
    this.maxConnections = Math.max(1, options.maxConnectionsPerTarget ?? 2);
    // Two slots minimum: one for the SFTP channel, one for exec.
    this.maxChannels = Math.max(2, options.maxChannelsPerConnection ?? 8);
    this.idleCloseMs = options.idleCloseMs ?? 60_000;
    this.timings = {
      keepaliveIntervalMs: options.keepaliveIntervalMs ?? 15_000,
      keepaliveCountMax: options.keepaliveCountMax ?? 3,
      readyTimeoutMs: options.readyTimeoutMs ?? 10_000,
    };
  }

  session(target: SshTarget): RemoteSession {
    return new RemoteSessionImpl(this, target);
  }

  stats(): SshPoolStats {
    const perTarget: Record<string, number> = {};
    let connections = 0;
    let channelsInUse = 0;
    for (const group of this.groups.values()) {
      const live = group.connections.filter((connection) => connection.state !== "dead");
      if (live.length === 0) continue;
      perTarget[group.key] = live.length;
      connections += live.length;
      for (const connection of live) channelsInUse += connection.channelsInUse;
    }
    return {
      connections,
      perTarget,
      channelsInUse,
      peakChannelsPerConnection: this.peakChannels,
      connectionsOpened: this.opened,
    };
  }

  /** Closes every connection; operations in flight fail with TransportError("closed"). */
  async close(): Promise<void> {
    this.closed = true;
    for (const group of this.groups.values()) {
      for (const connection of [...group.connections]) connection.close();
      for (const wake of group.waiters.splice(0)) wake();
    }
    this.groups.clear();
  }

  /** Leases one exec channel slot on the least busy usable connection, opening one if that spreads load. */
  async leaseChannel(target: SshTarget): Promise<ChannelLease> {
    const connection = await this.reserveExecSlot(target);
    return this.awaitReady(connection, () => {
      connection.execChannels -= 1;
    });
  }

  /**
   * Leases an exec slot for a long-lived channel (a followed log) only when one is free beyond
   * `spareSlots` on a usable connection, or a new connection may be opened; never waits. So streams
   * never crowd out the short commands of run steps. Null when no such slot is free now.
   */
  async tryLeaseChannel(target: SshTarget, spareSlots: number): Promise<ChannelLease | null> {
    if (this.closed) return null;
    const group = this.group(target);
    const limit = this.maxChannels - Math.max(0, spareSlots);
    const best = leastBy(
      this.usable(group).filter((connection) => connection.channelsInUse < limit),
      load,
    );
    const chosen =
      best ?? (group.connections.length < this.maxConnections && limit > 1 ? this.open(target, group) : null);
    if (!chosen) return null;
    chosen.execChannels += 1;
    this.cancelIdle(chosen);
    this.notePeak(chosen);
    return this.awaitReady(chosen, () => {
      chosen.execChannels -= 1;
    });
  }

  /**
   * Runs `operation` on an SFTP channel of the target, opening the channel on the least busy connection
   * that has none while other SFTP channels are busy (so parallel transfers spread over connections).
   */
  async withSftp<T>(
    target: SshTarget,
    operation: (sftp: SFTPWrapper, connection: PooledConnection) => Promise<T>,
  ) {
    const connection = await this.connectionForSftp(target);
    connection.sftpOperations += 1;
    this.cancelIdle(connection);
    try {
      const sftp = await this.guard(connection, connection.sftp!);
      return await this.guard(connection, operation(sftp, connection));
    } finally {
      connection.sftpOperations -= 1;
      this.afterRelease(connection);
    }
  }

  /** Rejects with the connection's death error if it dies while `work` is pending. */
  guard<T>(connection: PooledConnection, work: Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      const untrack = connection.track(reject);
      work.then(
        (value) => {
          untrack();
          resolve(value);
        },
        (error) => {
          untrack();
          reject(connection.state === "dead" && connection.deathError ? connection.deathError : error);
        },
      );
    });
  }

  /**
   * Picks (or opens) a connection and takes the slot in the same synchronous step, so two callers can
   * never both see the last free slot. A new connection is opened while the least busy one has work and
   * the target is below its connection limit: load spreads before it queues.
   */
  private async reserveExecSlot(target: SshTarget): Promise<PooledConnection> {
    for (;;) {
      if (this.closed) throw new TransportError("closed", "the SSH pool is closed");
      const group = this.group(target);
      const candidates = this.usable(group).filter(
        (connection) => connection.channelsInUse < this.maxChannels,
      );
      const best = leastBy(candidates, load);
      const canOpen = group.connections.length < this.maxConnections;
      const chosen =
        best && (!canOpen || load(best) === 0) ? best : canOpen ? this.open(target, group) : null;
      if (chosen) {
        chosen.execChannels += 1;
        this.cancelIdle(chosen);
        this.notePeak(chosen);
        return chosen;
      }
      await new Promise<void>((resolve) => group.waiters.push(resolve));
    }
  }

  private async connectionForSftp(target: SshTarget): Promise<PooledConnection> {
    for (;;) {
      if (this.closed) throw new TransportError("closed", "the SSH pool is closed");
      const group = this.group(target);
      const usable = this.usable(group);
      const best = leastBy(
        usable.filter((connection) => connection.sftp !== null),
        (connection) => connection.sftpOperations,
      );
      const spare = leastBy(
        usable.filter(
          (connection) => connection.sftp === null && connection.channelsInUse < this.maxChannels,
        ),
        load,
      );
      const canOpen = group.connections.length < this.maxConnections;
      if (best && (best.sftpOperations === 0 || (!canOpen && !spare))) return best;
      const host =
        spare && (!canOpen || load(spare) === 0) ? spare : canOpen ? this.open(target, group) : spare;
      if (host) {
        this.openSftp(host);
        this.cancelIdle(host);
        this.notePeak(host);
        return host;
      }
      if (best) return best;
      await new Promise<void>((resolve) => group.waiters.push(resolve));
    }
  }

  /** Starts the SFTP channel; its slot is taken now (connection.sftp is set synchronously). */
  private openSftp(connection: PooledConnection): void {
    const opening: Promise<SFTPWrapper> = connection.ready.then(() =>
      retryChannelOpen(
        () =>
          new Promise<SFTPWrapper>((resolve, reject) => {
            const untrack = connection.track(reject);
            connection.client.sftp((error, sftp) => {
              untrack();
              if (error) reject(classifySshError(error));
              else resolve(this.keepSftp(connection, opening, sftp));
            });
          }),
      ),
    );
    connection.sftp = opening;
    opening.catch(() => {
      if (connection.sftp === opening) connection.sftp = null;
      this.wake(this.groupOf(connection));
    });
  }

  private keepSftp(
    connection: PooledConnection,
    opening: Promise<SFTPWrapper>,
    sftp: SFTPWrapper,
  ): SFTPWrapper {
    const drop = () => {
      if (connection.sftp !== opening) return;
      connection.sftp = null;
      this.wake(this.groupOf(connection));
    };
    // Permanent handlers, as on the connection: a failing channel must not become an uncaught "error".
    sftp.on("error", drop);
    sftp.on("close", drop);
    sftp.on("end", drop);
    return sftp;
  }

  private async awaitReady(connection: PooledConnection, undo: () => void): Promise<ChannelLease> {
    try {
      await connection.ready;
    } catch (error) {
      undo();
      this.afterRelease(connection);
      throw connection.deathError ?? classifySshError(error);
    }
    let released = false;
    return {
      connection,
      release: () => {
        if (released) return;
        released = true;
        undo();
        this.afterRelease(connection);
      },
    };
  }

  private open(target: SshTarget, group: TargetGroup): PooledConnection {
    const connection = new PooledConnection(target, group.signature, this.timings);
    this.opened += 1;
    group.connections.push(connection);
    connection.onDeath(() => {
      const index = group.connections.indexOf(connection);
      if (index >= 0) group.connections.splice(index, 1);
      // Everyone waiting may now open the replacement connection.
      for (const wake of group.waiters.splice(0)) wake();
    });
    return connection;
  }

  private group(target: SshTarget): TargetGroup {
    const signature = targetSignature(target);
    let group = this.groups.get(target.key);
    if (group && group.signature !== signature) {
      // Same key, new address, account key or host key: retire the old connections once they are idle.
      for (const connection of group.connections) {
        connection.retiring = true;
        if (!connection.busy) connection.close();
      }
      for (const wake of group.waiters.splice(0)) wake();
      group = undefined;
    }
    if (!group) {
      group = { key: target.key, signature, connections: [], waiters: [] };
      this.groups.set(target.key, group);
    }
    return group;
  }

  private groupOf(connection: PooledConnection): TargetGroup | undefined {
    const group = this.groups.get(connection.target.key);
    return group && group.signature === connection.signature ? group : undefined;
  }

  private usable(group: TargetGroup): PooledConnection[] {
    return group.connections.filter((connection) => connection.state !== "dead" && !connection.retiring);
  }

  private notePeak(connection: PooledConnection): void {
    this.peakChannels = Math.max(this.peakChannels, connection.channelsInUse);
  }

  private afterRelease(connection: PooledConnection): void {
    if (connection.retiring && !connection.busy) {
      connection.close();
      return;
    }
    const group = this.groupOf(connection);
    if (group) this.wake(group);
    if (!connection.busy && connection.state !== "dead") this.scheduleIdle(connection);
  }

  /** Every waiter re-checks: an exec and an SFTP request need different things from a freed slot. */
  private wake(group: TargetGroup | undefined): void {
    if (!group) return;
    for (const resume of group.waiters.splice(0)) resume();
  }

  private scheduleIdle(connection: PooledConnection): void {
    this.cancelIdle(connection);
    connection.idleTimer = setTimeout(() => {
      if (!connection.busy) connection.close();
    }, this.idleCloseMs);
    // An idle connection must not keep the worker process alive on its own.
    connection.idleTimer.unref();
  }

  private cancelIdle(connection: PooledConnection): void {
    if (connection.idleTimer) clearTimeout(connection.idleTimer);
    connection.idleTimer = null;
  }
}

function load(connection: PooledConnection): number {
  return connection.channelsInUse + connection.sftpOperations;
}

function leastBy<T>(items: T[], score: (item: T) => number): T | undefined {
  let best: T | undefined;
  let bestScore = Number.POSITIVE_INFINITY;
  for (const item of items) {
    const value = score(item);
    if (value < bestScore) {
      best = item;
      bestScore = value;
    }
  }
  return best;
}

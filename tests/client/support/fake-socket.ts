/**
 * A stand-in for socket.io-client in client tests (tests/client/setup.ts mocks the package with it): a
 * socket that never reaches a server until a test says so, records what the page emits (with the ack
 * callbacks), and delivers what a test sends as if from the server. Without a test driving it, pages
 * behave as with the live feed unreachable.
 */
type Listener = (...args: unknown[]) => void;

export type Emitted = { event: string; payload: unknown; ack?: (answer: unknown) => void };

export class FakeSocket {
  connected = false;
  closed = false;
  readonly emitted: Emitted[] = [];
  private readonly listeners = new Map<string, Set<Listener>>();

  constructor(readonly options: unknown) {}

  on(event: string, listener: Listener): this {
    const set = this.listeners.get(event) ?? new Set();
    this.listeners.set(event, set);
    set.add(listener);
    return this;
  }

  off(event: string, listener: Listener): this {
    this.listeners.get(event)?.delete(listener);
    return this;
  }

  emit(event: string, payload?: unknown, ack?: (answer: unknown) => void): this {
    this.emitted.push({ event, payload, ack });
    return this;
  }

  removeAllListeners(): this {
    this.listeners.clear();
    return this;
  }

  close(): this {
    this.closed = true;
    this.connected = false;
    return this;
  }

  disconnect(): this {
    return this.close();
  }

  /** The connection is (re-)established. */
  serverConnect(): void {
    this.connected = true;
    this.deliver("connect");
  }

  /** The connection is lost (the client would reconnect by itself). */
  serverDisconnect(): void {
    this.connected = false;
    this.deliver("disconnect", "transport close");
  }

  /** An event from the server; `ack` receives the client's acknowledgement, if it sends one. */
  serverEmit(event: string, payload: unknown, ack?: () => void): void {
    if (ack) this.deliver(event, payload, ack);
    else this.deliver(event, payload);
  }

  /** What the page emitted for `event`, in order. */
  sent(event: string): Emitted[] {
    return this.emitted.filter((entry) => entry.event === event);
  }

  private deliver(event: string, ...args: unknown[]) {
    for (const listener of [...(this.listeners.get(event) ?? [])]) listener(...args);
  }
}

/** Every socket the page opened, oldest first. */
export const fakeSockets: FakeSocket[] = [];

export function io(options?: unknown): FakeSocket {
  const socket = new FakeSocket(options);
  fakeSockets.push(socket);
  return socket;
}

type Listener = (...args: unknown[]) => void;

class Emitter {
  private listeners = new Map<string, Set<Listener>>();
  on(event: string, listener: Listener) {
    if (!this.listeners.has(event)) this.listeners.set(event, new Set());
    this.listeners.get(event)!.add(listener);
    return this;
  }
  off(event: string, listener: Listener) {
    this.listeners.get(event)?.delete(listener);
    return this;
  }
  fire(event: string, ...args: unknown[]) {
    for (const listener of [...(this.listeners.get(event) ?? [])]) listener(...args);
  }
  count(event: string) {
    return this.listeners.get(event)?.size ?? 0;
  }
}

/** Enough of socket.io-client's Socket for the provider; the test plays the server. */
export class FakeSocket extends Emitter {
  connected = false;
  active = true;
  disconnectCalls = 0;
  readonly io = new Emitter();
  readonly options: unknown;

  constructor(options: unknown) {
    super();
    this.options = options;
  }

  connect() {
    this.active = true;
    return this;
  }

  disconnect() {
    this.disconnectCalls++;
    this.connected = false;
    this.active = false;
    return this;
  }

  /** The server accepted the connection. */
  serverConnect() {
    this.connected = true;
    this.active = true;
    this.fire('connect');
  }

  /** The transport dropped; the client keeps trying. */
  transportLost() {
    this.connected = false;
    this.active = true;
    this.fire('disconnect', 'transport close');
  }

  /** The server closed the socket; socket.io-client will not retry on its own. */
  serverDisconnect() {
    this.connected = false;
    this.active = false;
    this.fire('disconnect', 'io server disconnect');
  }

  serverEmit(event: string, ...args: unknown[]) {
    this.fire(event, ...args);
  }
}

export const fakeSockets: FakeSocket[] = [];

export function fakeIo(options?: unknown): FakeSocket {
  const socket = new FakeSocket(options);
  fakeSockets.push(socket);
  return socket;
}

export function resetFakeSockets() {
  fakeSockets.length = 0;
}

/** The socket the app is using now (StrictMode or remounts may have made earlier ones). */
export function currentSocket(): FakeSocket {
  const live = fakeSockets.filter((s) => s.disconnectCalls === 0);
  const socket = live[live.length - 1];
  if (!socket) throw new Error('The app has not opened a socket.');
  return socket;
}

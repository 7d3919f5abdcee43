/**
 * Counts open sockets across the MQTT listeners (TCP and WebSocket) and refuses those past the
 * configured maximum before any MQTT parsing, so a flood of connections costs little memory.
 */
export class ConnectionGate {
  private open = 0;

  constructor(private readonly max: number) {}

  get count(): number {
    return this.open;
  }

  /** Admits a socket (returns a release function) or returns null when full. */
  admit(): (() => void) | null {
    if (this.open >= this.max) return null;
    this.open += 1;
    let released = false;
    return () => {
      if (released) return;
      released = true;
      this.open -= 1;
    };
  }
}

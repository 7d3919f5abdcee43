/**
 * Dashboards holding live connections: each reads `GET /api/events` (server-sent events) with
 * a signed-in session cookie and, like a browser's EventSource, connects again after the stream
 * ends or fails. Every `site-update` event is logged with the time it arrived.
 */
export class SseClient {
  /** Arrival times (ms) of site-update events. */
  readonly events: number[] = [];
  /** Times (ms) a stream was (re)opened with a 200 answer. */
  readonly opened: number[] = [];
  /** Times (ms) a stream ended or failed. */
  readonly dropped: number[] = [];
  private abort: AbortController | undefined;
  private stopped = false;
  private loop: Promise<void> | undefined;

  constructor(
    private readonly url: string,
    private readonly cookie: string,
    private readonly retryMs = 250,
  ) {}

  start(): void {
    this.loop ??= this.run();
  }

  private async run(): Promise<void> {
    while (!this.stopped) {
      try {
        await this.readOnce();
      } catch {
        // refused or cut: try again, as EventSource does
      }
      if (this.stopped) break;
      this.dropped.push(Date.now());
      await new Promise((r) => setTimeout(r, this.retryMs));
    }
  }

  private async readOnce(): Promise<void> {
    this.abort = new AbortController();
    const res = await fetch(this.url, {
      headers: { cookie: this.cookie, accept: 'text/event-stream' },
      signal: this.abort.signal,
    });
    if (res.status !== 200 || !res.body) {
      await res.body?.cancel();
      throw new Error(`events answered ${res.status}`);
    }
    this.opened.push(Date.now());
    const decoder = new TextDecoder();
    let buffer = '';
    for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
      buffer += decoder.decode(chunk, { stream: true });
      let end: number;
      while ((end = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, end);
        buffer = buffer.slice(end + 2);
        if (/^event: site-update$/m.test(block)) this.events.push(Date.now());
      }
    }
  }

  /** The first event at or after `since` (ms), or null. */
  firstEventSince(since: number): number | null {
    return this.events.find((t) => t >= since) ?? null;
  }

  async stop(): Promise<void> {
    this.stopped = true;
    this.abort?.abort();
    await this.loop;
  }
}

/** Signs in through the API and returns the session's Cookie header. */
export async function signIn(apiUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${apiUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in answered ${res.status}: ${await res.text()}`);
  const cookies = res.headers.getSetCookie();
  await res.body?.cancel();
  return cookies
    .map((c) => c.split(';')[0]!)
    .filter((c) => !c.endsWith('='))
    .join('; ');
}

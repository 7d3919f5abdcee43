import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { repoRoot } from '@wellkept/db';

/** How to run one service (ingest or API) as a child process. */
export interface ServiceSpec {
  name: string;
  /** Arguments after `node`, e.g. ['ingest/dist/main.js']. */
  args: string[];
  env: NodeJS.ProcessEnv;
  /** An HTTP URL that answers 200 once the service is ready. */
  readyUrl: string;
}

/** Every child still running: killed if this process exits first (a failed or aborted run). */
const live = new Set<ChildProcess>();
process.once('exit', () => {
  for (const child of live) child.kill('SIGKILL');
});

/** Lines kept from a service's output, to show when something goes wrong. */
const KEEP_LINES = 200;

/**
 * A real service process the fault runs can start, kill and restart. Output is kept (not
 * printed) so a failing run can show the service's last words.
 */
export class ServiceProcess {
  private child: ChildProcess | undefined;
  private readonly lines: string[] = [];
  /** Exits that nobody asked for (a crash), with their code or signal. */
  readonly crashes: string[] = [];
  private expectingExit = false;

  constructor(readonly spec: ServiceSpec) {}

  get pid(): number | undefined {
    return this.child?.pid;
  }

  get running(): boolean {
    return Boolean(this.child && this.child.exitCode === null && this.child.signalCode === null);
  }

  /** Starts the process and resolves once its ready URL answers 200. */
  async start(timeoutMs = 60_000): Promise<void> {
    if (this.running) throw new Error(`${this.spec.name} is already running`);
    this.expectingExit = false;
    const child = spawn(process.execPath, this.spec.args, {
      cwd: repoRoot,
      env: this.spec.env,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    this.child = child;
    live.add(child);
    child.once('exit', () => live.delete(child));
    const keep = (chunk: Buffer) => {
      for (const line of chunk.toString('utf8').split('\n')) {
        if (!line) continue;
        this.lines.push(line);
        if (this.lines.length > KEEP_LINES) this.lines.shift();
      }
    };
    child.stdout!.on('data', keep);
    child.stderr!.on('data', keep);
    child.on('exit', (code, signal) => {
      if (!this.expectingExit) this.crashes.push(`${this.spec.name} exited (${signal ?? code})`);
    });
    await this.waitReady(timeoutMs);
  }

  /** Polls the ready URL until it answers 200 (the process must stay alive meanwhile). */
  async waitReady(timeoutMs = 60_000): Promise<void> {
    const until = Date.now() + timeoutMs;
    for (;;) {
      if (!this.running) {
        throw new Error(`${this.spec.name} exited while starting:\n${this.output(30)}`);
      }
      try {
        const res = await fetch(this.spec.readyUrl, { signal: AbortSignal.timeout(2000) });
        await res.body?.cancel();
        if (res.status === 200) return;
      } catch {
        // not listening yet
      }
      if (Date.now() > until) {
        throw new Error(`${this.spec.name} not ready after ${timeoutMs} ms:\n${this.output(30)}`);
      }
      await sleep(100);
    }
  }

  /** SIGKILL: no shutdown hooks run (a crash or an OOM kill). */
  async kill(): Promise<void> {
    await this.stopWith('SIGKILL', 0);
  }

  /**
   * SIGTERM, then SIGKILL after `graceMs`. Returns whether the process had to be killed
   * (a service that does not stop on SIGTERM is a finding of its own).
   */
  async stop(graceMs = 15_000): Promise<{ forced: boolean }> {
    return this.stopWith('SIGTERM', graceMs);
  }

  private async stopWith(signal: NodeJS.Signals, graceMs: number): Promise<{ forced: boolean }> {
    const child = this.child;
    if (!child || !this.running) return { forced: false };
    this.expectingExit = true;
    const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
    child.kill(signal);
    if (signal === 'SIGKILL') {
      await exited;
      return { forced: false };
    }
    let forced = false;
    const timer = setTimeout(() => {
      forced = true;
      child.kill('SIGKILL');
    }, graceMs);
    await exited;
    clearTimeout(timer);
    return { forced };
  }

  /** Resident memory of the process, bytes (Linux /proc), or null when not running. */
  rssBytes(): number | null {
    if (!this.running || !this.pid) return null;
    try {
      const status = readFileSync(`/proc/${this.pid}/status`, 'utf8');
      const kb = /VmRSS:\s+(\d+)\s+kB/.exec(status)?.[1];
      return kb ? Number(kb) * 1024 : null;
    } catch {
      return null;
    }
  }

  /** The last lines the service wrote. */
  output(lines = 50): string {
    return this.lines.slice(-lines).join('\n');
  }
}

export function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

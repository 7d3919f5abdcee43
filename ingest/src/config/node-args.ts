/**
 * The Node.js flags ingest runs with. Every launcher (npm start, the fault and load runs, the
 * benchmarks, the cluster tests) starts `ingest/dist/main.js` with these, so the process they
 * measure is the one that runs.
 *
 * INGEST_HEAP_MB caps V8's old space (default 384 MB). Ingest allocates fast (every pack is
 * parsed, validated and queued) and most of it dies within a second, but packs waiting for a
 * commit outlive young-generation collections; with no cap V8 grew the heap to 500+ MB of
 * mostly dead objects before collecting, and the process to 1 GB at 10,000 connections. The
 * live heap there was about 150 MB, so 384 MB leaves room; capped, the benchmark measured
 * RSS under 500 MB at 10,000 connections, with throughput no lower in the runs measured.
 * Raise it for far more connections than that: past the cap the process stops with an
 * out-of-memory error, and gateways re-send whatever was not acknowledged.
 */
export const DEFAULT_INGEST_HEAP_MB = 384;
export const MIN_INGEST_HEAP_MB = 128;

/** The heap cap from the environment, or why the value cannot be used. */
export function ingestHeapMegabytes(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.INGEST_HEAP_MB;
  if (raw === undefined || raw === '') return DEFAULT_INGEST_HEAP_MB;
  const mb = Number(raw);
  if (!Number.isInteger(mb) || mb < MIN_INGEST_HEAP_MB) {
    throw new Error(
      `INGEST_HEAP_MB must be a whole number of megabytes, at least ${MIN_INGEST_HEAP_MB} (got "${raw}")`,
    );
  }
  return mb;
}

/** Arguments to put before `ingest/dist/main.js` on the `node` command line. */
export function ingestNodeArgs(env: NodeJS.ProcessEnv = process.env): string[] {
  return [`--max-old-space-size=${ingestHeapMegabytes(env)}`];
}

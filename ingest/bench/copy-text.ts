import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { PoolClient } from 'pg';
import copyStreams from 'pg-copy-streams';

/**
 * Streams `text` into `statement` (a `copy … from stdin`) on a client the caller holds: how the
 * benchmarks load their rows, at PostgreSQL's own bulk speed.
 */
export async function copyText(client: PoolClient, statement: string, text: string): Promise<void> {
  await pipeline(Readable.from([text]), client.query(copyStreams.from(statement)));
}

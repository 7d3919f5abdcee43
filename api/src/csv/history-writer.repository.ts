import { Injectable } from '@nestjs/common';
import { type Database, ensureTimePartitions } from '@wellkept/db';
import { sql } from 'kysely';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';
import type { ParsedRow } from './csv-import.parser.js';

/** Switch channels: minutes after a late row whose runs ingest re-derives (ingest's SWITCH_RESCAN_MINUTES). */
const SWITCH_RESCAN_MINUTES = 10;
const CHUNK = 5000;

/**
 * Writes imported history the way ingest stores telemetry (ingest/src/storage/
 * telemetry-batch.repository.ts): readings with ON CONFLICT DO NOTHING (a re-import stores
 * nothing twice), the touched minutes listed in `rollup_pending` so ingest's roll-up sweep
 * recomputes minute/hour/day buckets and pump runs, and one NOTIFY site_updates per commit.
 * TODO(ingest): call a shared storage function once ingest exports one.
 */
@Injectable()
export class HistoryWriterRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async write(
    site: VisibleSite,
    rows: ParsedRow[],
  ): Promise<{ stored: number; total: number; channelsCreated: string[] }> {
    const kinds = new Map<string, { unit: string; valueKind: 'number' | 'boolean' | 'string' }>();
    for (const r of rows)
      for (const v of r.values) kinds.set(v.m.name, { unit: v.m.unit, valueKind: v.m.valueKind });
    let minT = Infinity;
    let maxT = -Infinity;
    for (const r of rows) {
      if (r.t < minT) minT = r.t;
      if (r.t > maxT) maxT = r.t;
    }
    if (!rows.length) return { stored: 0, total: 0, channelsCreated: [] };
    await ensureTimePartitions(
      this.db,
      'readings',
      new Date(minT * 1000),
      new Date(maxT * 1000 + 1),
    );
    return this.db.transaction().execute(async (trx) => {
      const names = [...kinds.keys()];
      const created = await trx
        .insertInto('channels')
        .values(
          names.map((name) => ({
            site_id: site.id,
            name,
            unit: kinds.get(name)!.unit,
            value_kind: kinds.get(name)!.valueKind,
          })),
        )
        .onConflict((oc) => oc.columns(['site_id', 'name']).doNothing())
        .returning('name')
        .execute();
      const channels = await trx
        .selectFrom('channels')
        .select(['id', 'name'])
        .where('site_id', '=', site.id)
        .where('name', 'in', names)
        .execute();
      const ids = new Map(channels.map((c) => [c.name, c.id]));
      const flat: { c: number[]; t: number[]; v: (number | null)[]; x: (string | null)[] } = {
        c: [],
        t: [],
        v: [],
        x: [],
      };
      for (const r of rows) {
        for (const v of r.values) {
          flat.c.push(ids.get(v.m.name)!);
          flat.t.push(r.t);
          flat.v.push(v.value);
          flat.x.push(v.text);
        }
      }
      let stored = 0;
      for (let i = 0; i < flat.c.length; i += CHUNK) {
        const result = await sql`
          insert into readings (site_id, channel_id, time, value, text_value)
          select ${site.id}::uuid, c, to_timestamp(t), v, x
            from unnest(${flat.c.slice(i, i + CHUNK)}::int[], ${flat.t.slice(i, i + CHUNK)}::float8[],
                        ${flat.v.slice(i, i + CHUNK)}::float8[], ${flat.x.slice(i, i + CHUNK)}::text[]) as r(c, t, v, x)
          on conflict do nothing`.execute(trx);
        stored += Number(result.numAffectedRows ?? 0);
      }
      const switches = new Set(
        [...kinds].filter(([, k]) => k.valueKind === 'boolean').map(([n]) => ids.get(n)!),
      );
      const spans = flat.c.map((c) => (switches.has(c) ? SWITCH_RESCAN_MINUTES : 0));
      await sql`
        insert into rollup_pending (site_id, minute)
        select distinct ${site.id}::uuid, m.minute
          from unnest(${flat.t}::float8[], ${spans}::int[]) as l(t, span)
          cross join lateral generate_series(
            date_trunc('minute', to_timestamp(l.t), 'UTC'),
            date_trunc('minute', to_timestamp(l.t), 'UTC') + l.span * interval '1 minute',
            interval '1 minute') as m(minute)
        on conflict do nothing`.execute(trx);
      // Latest values move only when the file holds newer readings than the gateway sent.
      await sql`
        update channels c set last_time = n.time, last_value = n.value, last_text = n.text_value
          from (select distinct on (channel_id) channel_id, time, value, text_value
                  from readings where site_id = ${site.id} and channel_id = any(${[...ids.values()]}::int[])
                   and time >= to_timestamp(${minT}) order by channel_id, time desc) n
         where c.id = n.channel_id and (c.last_time is null or c.last_time < n.time)`.execute(trx);
      const payload = JSON.stringify({
        siteId: site.id,
        what: ['readings'],
        at: new Date().toISOString(),
      });
      await sql`select pg_notify('site_updates', ${payload})`.execute(trx);
      return { stored, total: flat.c.length, channelsCreated: created.map((c) => c.name) };
    });
  }
}

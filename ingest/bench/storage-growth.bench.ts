/**
 * Database growth benchmark (run by `npm run bench -w ingest`; figures printed, nothing
 * asserted). On a durable PostgreSQL of its own:
 *  - COPY of one day of raw readings for BENCH_GROWTH_SITES sites (default 20) into `readings`
 *    (its real primary key and daily partitions): raw rows/s this PostgreSQL takes;
 *  - the minute, hour and day buckets of that day built by ingest's own roll-up SQL
 *    (BucketsRepository);
 *  - bytes per row of each table (pg_total_relation_size over all partitions: heap, primary
 *    key, TOAST; hour and day buckets are plain tables), after VACUUM ANALYZE;
 *  - storage per site per year for a typical site (10 channels every 30 s, as in
 *    docs/telemetry.md), with the raw retention (INGEST_RAW_RETENTION_DAYS, default 90) and
 *    the buckets kept for the year.
 */
import { createPool, ensureTimePartitions, startThrowawayCluster, type DB } from '@wellkept/db';
import { Kysely, PostgresDialect, sql } from 'kysely';
import { BucketsRepository } from '../src/storage/buckets.repository.js';
import { copyText } from './copy-text.js';

const SITES = Number(process.env.BENCH_GROWTH_SITES ?? 20);
const RETENTION_DAYS = Number(process.env.INGEST_RAW_RETENTION_DAYS ?? 90);
const INTERVAL_S = 30;
const DAY_S = 86_400;
/** A typical site's channels (docs/telemetry.md example): name, kind. */
const CHANNELS: [string, 'number' | 'boolean' | 'string', string][] = [
  ['battery/voltage', 'number', 'V'],
  ['battery/current', 'number', 'A'],
  ['battery/temperature', 'number', 'Cel'],
  ['pv/roof/voltage', 'number', 'V'],
  ['pv/roof/current', 'number', 'A'],
  ['pump/well/running', 'boolean', ''],
  ['pump/well/current', 'number', 'A'],
  ['tank/main/level', 'number', 'm'],
  ['float/main-high/closed', 'boolean', ''],
  ['controller/stage', 'string', ''],
];
const log = (m: string) => console.log(`[bench growth] ${m}`);

const pg = await startThrowawayCluster({ prefix: 'bench', database: 'growth', durable: true, log });
try {
  const pool = createPool(pg.databaseUrl, { max: 2, applicationName: 'wellkept-bench' });
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  const day = new Date(Date.UTC(new Date().getUTCFullYear(), new Date().getUTCMonth(), 1));
  const dayEnd = new Date(day.getTime() + DAY_S * 1000);
  await ensureTimePartitions(db, 'readings', day, dayEnd);
  await ensureTimePartitions(db, 'minute_buckets', day, dayEnd);

  log(`seeding ${SITES} sites with ${CHANNELS.length} channels each`);
  const company = await db
    .insertInto('companies')
    .values({ name: 'Growth bench installer' })
    .returning('id')
    .executeTakeFirstOrThrow();
  const channels: { site: string; id: number; kind: string; index: number }[] = [];
  for (let s = 0; s < SITES; s++) {
    const site = await db
      .insertInto('sites')
      .values({
        company_id: company.id,
        name: `Growth site ${s}`,
        latitude: -20,
        longitude: 130,
        time_zone: 'UTC',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    for (const [index, [name, kind, unit]] of CHANNELS.entries()) {
      const row = await db
        .insertInto('channels')
        .values({ site_id: site.id, name, unit, value_kind: kind })
        .returning('id')
        .executeTakeFirstOrThrow();
      channels.push({ site: site.id, id: row.id, kind, index });
    }
  }

  // One day of raw readings, every channel every 30 s, through COPY (what ingest uses).
  const samples = DAY_S / INTERVAL_S;
  const rawRows = samples * channels.length;
  log(`COPY of ${rawRows.toLocaleString('en-US')} raw readings (one day)`);
  const client = await pool.connect();
  let copySeconds: number;
  try {
    const started = performance.now();
    const chunk = 200; // samples per COPY statement, all channels
    for (let first = 0; first < samples; first += chunk) {
      const lines: string[] = [];
      for (let i = first; i < Math.min(samples, first + chunk); i++) {
        const time = new Date(day.getTime() + i * INTERVAL_S * 1000).toISOString();
        for (const c of channels) {
          const wave = Math.sin((i / samples) * 2 * Math.PI + c.index);
          const value =
            c.kind === 'boolean'
              ? wave > 0
                ? '1'
                : '0'
              : c.kind === 'string'
                ? '\\N'
                : (20 + 5 * wave).toFixed(3);
          const text = c.kind === 'string' ? (wave > 0 ? 'bulk' : 'float') : '\\N';
          lines.push(`${c.site}\t${c.id}\t${time}\t${value}\t${text}\t${time}\n`);
        }
      }
      await copyText(
        client,
        'copy readings (site_id, channel_id, time, value, text_value, received_at) from stdin',
        lines.join(''),
      );
    }
    copySeconds = (performance.now() - started) / 1000;
  } finally {
    client.release();
  }

  log('rolling the day up into minute, hour and day buckets (ingest roll-up SQL)');
  const buckets = new BucketsRepository();
  const rollStarted = performance.now();
  await db.transaction().execute(async (trx) => {
    await buckets.rollUpMinutes(trx, day, dayEnd);
    await buckets.accumulateMinutes(trx, day, dayEnd);
  });
  const rollSeconds = (performance.now() - rollStarted) / 1000;
  await sql`vacuum analyze`.execute(db);

  const measure = async (table: string) => {
    const { rows } = await sql<{ rows: string; bytes: string }>`
      select (select count(*) from ${sql.table(table)})::text as rows,
             coalesce(
               (select sum(pg_total_relation_size(relid)) from pg_partition_tree(${table}::regclass)),
               pg_total_relation_size(${table}::regclass))::text as bytes`.execute(db);
    const r = rows[0]!;
    return { rows: Number(r.rows), bytes: Number(r.bytes) };
  };
  const sizes = {
    readings: await measure('readings'),
    minute_buckets: await measure('minute_buckets'),
    hour_buckets: await measure('hour_buckets'),
    day_buckets: await measure('day_buckets'),
  };
  await db.destroy();

  const perRow = (t: keyof typeof sizes) => sizes[t].bytes / sizes[t].rows;
  // Rows per typical site per year (numeric and switch channels get buckets; the stage string
  // channel does not).
  const bucketChannels = CHANNELS.filter(([, kind]) => kind !== 'string').length;
  const perSite = {
    raw: CHANNELS.length * samples * RETENTION_DAYS,
    minute: bucketChannels * 1440 * 365,
    hour: bucketChannels * 24 * 365,
    day: bucketChannels * 365,
  };
  const bytes = {
    raw: perSite.raw * perRow('readings'),
    minute: perSite.minute * perRow('minute_buckets'),
    hour: perSite.hour * perRow('hour_buckets'),
    day: perSite.day * perRow('minute_buckets'), // day buckets share the minute rows' shape
  };
  const total = bytes.raw + bytes.minute + bytes.hour + bytes.day;
  const f = (n: number, digits = 0) => n.toLocaleString('en-US', { maximumFractionDigits: digits });
  const mb = (n: number) => `${f(n / 1024 / 1024, 1)} MB`;
  console.log(`
Database growth — ${SITES} sites × ${CHANNELS.length} channels every ${INTERVAL_S} s, one day
  COPY into readings (primary key, daily partition): ${f(rawRows / copySeconds)} rows/s (${f(rawRows)} rows in ${f(copySeconds, 1)} s)
  roll-up of the day into minute/hour/day buckets: ${f(rollSeconds, 1)} s
  bytes per row (table + indexes, after VACUUM):
    readings ${f(perRow('readings'))}, minute_buckets ${f(perRow('minute_buckets'))}, hour_buckets ${f(perRow('hour_buckets'))}, day_buckets ${f(perRow('day_buckets'))} (${f(sizes.day_buckets.rows)} rows: page-bound)
  one typical site (${CHANNELS.length} channels / ${INTERVAL_S} s = ${f(CHANNELS.length / INTERVAL_S, 2)} records/s):
    raw readings, ${RETENTION_DAYS} days kept:   ${f(perSite.raw)} rows = ${mb(bytes.raw)} (steady state)
    minute buckets, one year:     ${f(perSite.minute)} rows = ${mb(bytes.minute)}
    hour buckets, one year:       ${f(perSite.hour)} rows = ${mb(bytes.hour)}
    day buckets, one year:        ${f(perSite.day)} rows = ${mb(bytes.day)}
    total after one year:         ${mb(total)}; each further year adds ${mb(bytes.minute + bytes.hour + bytes.day)}
  1,000 sites: ${f((1000 * CHANNELS.length) / INTERVAL_S)} records/s, ${f((1000 * total) / 1024 ** 3, 1)} GB after one year
`);
} finally {
  pg.destroy();
}

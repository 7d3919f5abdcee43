/**
 * Roll-up sweep benchmark (run by `npm run bench -w ingest`; figures printed, nothing asserted):
 * what the sweep's two per-site parts cost, pump runs while pumps run (a solar pump's day, a
 * stuck float) and late minutes (a gateway sending what it stored while offline). On a durable
 * PostgreSQL of its own:
 *  - BENCH_SWEEP_SITES sites (default 300, the rules tests' homestead) whose well pump switched
 *    on BENCH_SWEEP_RUN_HOURS ago (default 8) and is still on, with switch, current, bank voltage
 *    and tank level every 30 s, loaded by COPY;
 *  - one sweep's pump-run re-derivation of every site, as ingest does it once a minute while the
 *    pumps run: continuing each open run from its carry, and (in the same run, alternating)
 *    reading each run again from its start, as it did until 3 December 2026;
 *  - recomputing five late minutes of every site (their minute buckets from raw readings, then
 *    their hours and days);
 *  - wall time, this process's CPU time and the samples read, per sweep and per site.
 */
import { EventEmitter2 } from '@nestjs/event-emitter';
import { createPool, ensureTimePartitions, startThrowawayCluster, type DB } from '@wellkept/db';
import { Kysely, PostgresDialect, sql } from 'kysely';
import { createLogger } from '../src/logging/logger.js';
import { PumpRunsRepository } from '../src/pump-runs/pump-runs.repository.js';
import { PumpRunsService } from '../src/pump-runs/pump-runs.service.js';
import { BucketsRepository } from '../src/storage/buckets.repository.js';
import { SiteUpdates } from '../src/site-updates/site-updates.js';
import { createCompany, createSite } from '../test/rules/support/homestead-site.js';
import { copyText } from './copy-text.js';

const SITES = Number(process.env.BENCH_SWEEP_SITES ?? 300);
const RUN_HOURS = Number(process.env.BENCH_SWEEP_RUN_HOURS ?? 8);
const ROUNDS = Number(process.env.BENCH_SWEEP_ROUNDS ?? 3);
const INTERVAL_S = 30;
const log = (m: string) => console.log(`[bench sweep] ${m}`);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? NaN;

const pg = await startThrowawayCluster({ prefix: 'bench', database: 'sweep', durable: true, log });
try {
  const pool = createPool(pg.databaseUrl, { max: 2, applicationName: 'wellkept-bench' });
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  const nowT = Math.floor(Date.now() / 1000 / 60) * 60;
  const startT = nowT - RUN_HOURS * 3600;
  await ensureTimePartitions(
    db,
    'readings',
    new Date((startT - 3600) * 1000),
    new Date((nowT + 60) * 1000),
  );

  log(`seeding ${SITES} sites, each pump on for ${RUN_HOURS} h, samples every ${INTERVAL_S} s`);
  const company = await createCompany(db, 'Sweep bench installer');
  const siteIds: string[] = [];
  let rows = 0;
  for (let s = 0; s < SITES; s++) {
    const site = await createSite(db, company.id, { name: `Sweep bench site ${s}` });
    siteIds.push(site.id);
    const channel = async (name: string, unit: string, kind: 'number' | 'boolean') =>
      (
        await db
          .insertInto('channels')
          .values({ site_id: site.id, name, unit, value_kind: kind })
          .returning('id')
          .executeTakeFirstOrThrow()
      ).id;
    const running = await channel('pump/well/running', '', 'boolean');
    const current = await channel('pump/well/current', 'A', 'number');
    const volts = await channel('battery/voltage', 'V', 'number');
    const level = await channel('tank/main/level', 'm', 'number');
    const lines: string[] = [];
    // Off a minute before the start, then on every sample since.
    for (let t = startT - 60, i = 0; t < nowT; t += INTERVAL_S, i++) {
      const on = t >= startT;
      const at = new Date(t * 1000).toISOString();
      lines.push(`${site.id}\t${running}\t${at}\t${on ? 1 : 0}\n`);
      lines.push(`${site.id}\t${current}\t${at}\t${on ? 5 + (i % 7) / 10 : 0}\n`);
      lines.push(`${site.id}\t${volts}\t${at}\t${25 + (i % 5) / 10}\n`);
      lines.push(`${site.id}\t${level}\t${at}\t${(0.5 + i / 2000).toFixed(4)}\n`);
    }
    rows += lines.length;
    const client = await pool.connect();
    try {
      await copyText(
        client,
        'copy readings (site_id, channel_id, time, value) from stdin',
        lines.join(''),
      );
    } finally {
      client.release();
    }
  }
  await sql`vacuum analyze`.execute(db);
  log(`${rows.toLocaleString('en-US')} readings stored`);

  const repository = new PumpRunsRepository(db);
  let samplesRead = 0;
  const read = repository.samples.bind(repository);
  repository.samples = async (wanted, on) => {
    const found = await read(wanted, on);
    for (const list of found.values()) samplesRead += list.length;
    return found;
  };
  const service = new PumpRunsService(
    repository,
    new SiteUpdates(new EventEmitter2()),
    createLogger('silent'),
  );
  /** One sweep's re-derivation of every site from `from`, the watermark at `settled`. */
  const sweep = async (from: number, settled: number) => {
    samplesRead = 0;
    const cpu0 = process.cpuUsage();
    const wall0 = performance.now();
    const fromBySite = new Map(siteIds.map((id) => [id, new Date(from * 1000)]));
    await db
      .transaction()
      .execute((trx) => service.rederiveIn(trx, fromBySite, new Date(settled * 1000)));
    const cpu = process.cpuUsage(cpu0);
    return {
      wall: performance.now() - wall0,
      cpu: (cpu.user + cpu.system) / 1000,
      samples: samplesRead,
    };
  };

  // The runs as the sweeps have kept them so far: open, carried up to ten minutes ago.
  await sweep(startT, nowT - 600);
  const carried: Awaited<ReturnType<typeof sweep>>[] = [];
  const fromStart: Awaited<ReturnType<typeof sweep>>[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    // The next sweep: the ten minutes since the carry, continued from it ...
    carried.push(await sweep(nowT - 600, nowT - 600));
    // ... and the same sweep with no carry to continue from: every run read from its start.
    await sql`update pump_runs set open_run_carry = null`.execute(db);
    fromStart.push(await sweep(nowT - 600, nowT - 600));
  }
  // Late minutes: five minutes an hour ago at every site, as a gateway back from an outage
  // sends them (each recomputed from its raw readings, then its hours and days).
  const buckets = new BucketsRepository();
  const lateSites = siteIds.flatMap((id) => [0, 1, 2, 3, 4].map(() => id));
  const lateMinutes = siteIds.flatMap(() =>
    [0, 1, 2, 3, 4].map((k) => new Date((nowT - 3600 + 60 * k) * 1000)),
  );
  const late: { wall: number; cpu: number }[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    const cpu0 = process.cpuUsage();
    const wall0 = performance.now();
    await db.transaction().execute((trx) => buckets.recomputeMinutes(trx, lateSites, lateMinutes));
    const cpu = process.cpuUsage(cpu0);
    late.push({ wall: performance.now() - wall0, cpu: (cpu.user + cpu.system) / 1000 });
  }

  const open = await db
    .selectFrom('pump_runs')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('ended_at', 'is', null)
    .executeTakeFirstOrThrow();
  const line = (what: string, xs: Awaited<ReturnType<typeof sweep>>[]) => {
    const wall = median(xs.map((x) => x.wall));
    const cpu = median(xs.map((x) => x.cpu));
    const samples = median(xs.map((x) => x.samples));
    return `  ${what}: ${wall.toFixed(0)} ms a sweep (${(wall / SITES).toFixed(2)} ms a site), ingest CPU ${cpu.toFixed(0)} ms, ${samples.toLocaleString('en-US')} samples read`;
  };
  const ratio =
    median(fromStart.map((x) => x.wall)) / Math.max(median(carried.map((x) => x.wall)), 1e-9);
  console.log(`
Pump-run re-derivation, ${SITES} sites with a pump on for ${RUN_HOURS} h (${Number(open.n)} open runs), median of ${ROUNDS}:
${line('continued from each run carry', carried)}
${line('each run read from its start  ', fromStart)}
  from the start / continued: ${ratio.toFixed(1)}x wall time
  late minutes, ${lateMinutes.length.toLocaleString('en-US')} (site, minute) pairs recomputed: ${median(late.map((x) => x.wall)).toFixed(0)} ms (${(median(late.map((x) => x.wall)) / lateMinutes.length).toFixed(3)} ms a minute), ingest CPU ${median(late.map((x) => x.cpu)).toFixed(0)} ms
  at 10,000 such sites and one sweep a minute, continued: ${(((median(carried.map((x) => x.wall)) / SITES) * 10_000) / 1000).toFixed(1)} s of every minute; from the start: ${(((median(fromStart.map((x) => x.wall)) / SITES) * 10_000) / 1000).toFixed(1)} s`);
  await db.destroy();
} finally {
  pg.destroy();
}

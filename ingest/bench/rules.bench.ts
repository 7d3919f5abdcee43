/**
 * Rules benchmark (run by `npm run bench -w ingest`; figures printed, nothing asserted): what one
 * evaluation of a site's data rules costs at a realistic density, and so how many sites one
 * ingest node can judge at the data-triggered cadence. On a durable PostgreSQL of its own:
 *  - BENCH_RULES_SITES homesteads (default 40; the rules tests' site: bank, array, well pump,
 *    tank, float) with 30 hours of readings every BENCH_RULES_INTERVAL_S (default 30, the typical
 *    reporting interval of docs/telemetry.md), simulated from core's physics and loaded by COPY;
 *  - per evaluation, the samples read as ingest reads them (RuleDataRepository: one row per
 *    channel, JSON arrays) and, in the same run, one row per sample (how it read them until
 *    3 December 2026): wall time and this process's CPU time for each;
 *  - CPU time of each data rule's evaluator (core) on those samples, and of overnight sag
 *    (judged once a night);
 *  - sites one core of ingest could judge every RULES_MIN_INTERVAL_MS (default 120 s).
 */
import { RULE_EVALUATORS, type AlertKind, type RuleInput, type Sample } from '@wellkept/core';
import { createPool, ensureTimePartitions, startThrowawayCluster, type DB } from '@wellkept/db';
import { Kysely, PostgresDialect, sql } from 'kysely';
import { DEFAULT_DATA_WINDOW, RuleDataRepository } from '../src/rules/rule-data.repository.js';
import { readRulesConfig } from '../src/rules/rules-config.js';
import { DATA_KINDS } from '../src/rules/rules-evaluation.service.js';
import { SiteConfigRepository } from '../src/rules/site-config.repository.js';
import { Homestead } from '../test/rules/support/homestead-series.js';
import { createCompany, createSite } from '../test/rules/support/homestead-site.js';
import { copyText } from './copy-text.js';

const SITES = Number(process.env.BENCH_RULES_SITES ?? 40);
const INTERVAL_S = Number(process.env.BENCH_RULES_INTERVAL_S ?? 30);
const ROUNDS = Number(process.env.BENCH_RULES_ROUNDS ?? 3);
const MIN_INTERVAL_MS = readRulesConfig(process.env).minIntervalMs;
const HISTORY_S = 30 * 3600;
const log = (m: string) => console.log(`[bench rules] ${m}`);

/** CPU time of this process (user + system) and wall time around `work`, milliseconds. */
async function timed<T>(
  work: () => Promise<T> | T,
): Promise<{ result: T; cpu: number; wall: number }> {
  const cpu0 = process.cpuUsage();
  const wall0 = performance.now();
  const result = await work();
  const cpu = process.cpuUsage(cpu0);
  return { result, cpu: (cpu.user + cpu.system) / 1000, wall: performance.now() - wall0 };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? NaN;
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / Math.max(xs.length, 1);
const ms = (x: number) => `${x.toFixed(1)} ms`;

const pg = await startThrowawayCluster({ prefix: 'bench', database: 'rules', durable: true, log });
try {
  const pool = createPool(pg.databaseUrl, { max: 2, applicationName: 'wellkept-bench' });
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  const nowT = Math.floor(Date.now() / 1000 / 60) * 60;
  const now = new Date(nowT * 1000);
  const startT = nowT - HISTORY_S;
  await ensureTimePartitions(db, 'readings', new Date(startT * 1000), new Date(now.getTime() + 1));

  log(`seeding ${SITES} homesteads, ${HISTORY_S / 3600} h of readings every ${INTERVAL_S} s`);
  const company = await createCompany(db, 'Rules bench installer');
  const siteIds: string[] = [];
  let rows = 0;
  for (let s = 0; s < SITES; s++) {
    const site = await createSite(db, company.id, { name: `Rules bench homestead ${s}` });
    siteIds.push(site.id);
    const channelIds = new Map<string, number>();
    const lines: string[] = [];
    // Each site starts at a different tank level, so their pumps do not run in step.
    const home = new Homestead(startT, { level: 1.0 + (s % 8) / 10 });
    while (home.t < nowT) {
      for (const r of home.step(INTERVAL_S)) {
        let id = channelIds.get(r.name);
        if (id === undefined) {
          const kind =
            typeof r.value === 'boolean'
              ? 'boolean'
              : typeof r.value === 'string'
                ? 'string'
                : 'number';
          const row = await db
            .insertInto('channels')
            .values({ site_id: site.id, name: r.name, unit: r.unit ?? '', value_kind: kind })
            .returning('id')
            .executeTakeFirstOrThrow();
          id = row.id;
          channelIds.set(r.name, id);
        }
        const value =
          typeof r.value === 'boolean'
            ? r.value
              ? '1'
              : '0'
            : typeof r.value === 'number'
              ? String(r.value)
              : '\\N';
        const text = typeof r.value === 'string' ? r.value : '\\N';
        lines.push(`${site.id}\t${id}\t${new Date(r.t * 1000).toISOString()}\t${value}\t${text}\n`);
      }
    }
    rows += lines.length;
    const client = await pool.connect();
    try {
      await copyText(
        client,
        'copy readings (site_id, channel_id, time, value, text_value) from stdin',
        lines.join(''),
      );
    } finally {
      client.release();
    }
  }
  await sql`vacuum analyze`.execute(db);
  log(`${rows.toLocaleString('en-US')} readings stored; evaluating every site ${ROUNDS} times`);

  const data = new RuleDataRepository(db);
  const configs = await new SiteConfigRepository(db).load(siteIds);
  /** The read as it was until 3 December 2026: one row object per sample. */
  const seriesOneRowPerSample = async (siteId: string) => {
    const rawFrom = new Date(now.getTime() - DEFAULT_DATA_WINDOW.rawSeconds * 1000);
    const tankFrom = new Date(now.getTime() - DEFAULT_DATA_WINDOW.tankSeconds * 1000);
    const { rows: samples } = await sql<{
      name: string;
      kind: string;
      t: number;
      value: number | null;
      text: string | null;
    }>`
      select c.name, c.value_kind as kind, extract(epoch from r.time)::float8 as t,
             r.value, r.text_value as text
      from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
      where r.site_id = ${siteId} and r.time > ${rawFrom} and r.time <= ${now}
      union all
      select distinct on (c.name, date_bin(${`${DEFAULT_DATA_WINDOW.thinSeconds} seconds`}::interval, r.time, timestamptz 'epoch'))
             c.name, c.value_kind, extract(epoch from r.time)::float8, r.value, r.text_value
      from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
      where r.site_id = ${siteId} and r.time > ${tankFrom} and r.time <= ${rawFrom}
        and c.name like 'tank/%/level'
      order by 3`.execute(db);
    const series: Record<string, Sample<number | boolean | string>[]> = {};
    for (const r of samples) {
      const v = r.kind === 'boolean' ? r.value !== 0 : r.kind === 'string' ? r.text : r.value;
      if (v !== null) (series[r.name] ??= []).push({ t: r.t, v });
    }
    return series;
  };

  const before = { cpu: [] as number[], wall: [] as number[] };
  const after = { cpu: [] as number[], wall: [] as number[] };
  const kindCpu = new Map<AlertKind, number[]>();
  const samplesRead: number[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    for (const siteId of siteIds) {
      const old = await timed(() => seriesOneRowPerSample(siteId));
      const current = await timed(() => data.series(siteId, now));
      // The first round warms caches (PostgreSQL's and V8's); only later rounds count.
      if (round === 0 && ROUNDS > 1) continue;
      before.cpu.push(old.cpu);
      before.wall.push(old.wall);
      after.cpu.push(current.cpu);
      after.wall.push(current.wall);
      samplesRead.push(Object.values(current.result).reduce((n, s) => n + s.length, 0));
      const site = configs.get(siteId)!;
      const input: RuleInput = {
        nowT,
        site: site.config,
        series: current.result,
        lastReadingT: Object.fromEntries(site.config.gateways.map((g) => [g.id, nowT])),
        openAlerts: [],
      };
      for (const kind of [...DATA_KINDS, 'overnight_sag'] as AlertKind[]) {
        const run = await timed(() => RULE_EVALUATORS[kind](input, site.overrides));
        (kindCpu.get(kind) ?? kindCpu.set(kind, []).get(kind)!).push(run.cpu);
      }
    }
  }
  await db.destroy();

  const dataKindsCpu = DATA_KINDS.reduce((s, k) => s + mean(kindCpu.get(k) ?? []), 0);
  const perEvaluationCpu = mean(after.cpu) + dataKindsCpu;
  const perEvaluationBefore = mean(before.cpu) + dataKindsCpu;
  const dbPerEvaluation = mean(after.wall.map((w, i) => Math.max(w - (after.cpu[i] ?? 0), 0)));
  const sitesPerCore = (cpuMs: number) => Math.floor(MIN_INTERVAL_MS / cpuMs);
  console.log(`
Rules benchmark — ${SITES} homesteads, readings every ${INTERVAL_S} s, ${after.cpu.length} evaluations measured
  samples read per evaluation:         ${Math.round(mean(samplesRead)).toLocaleString('en-US')} (${DEFAULT_DATA_WINDOW.rawSeconds / 3600} h raw, tank levels ${DEFAULT_DATA_WINDOW.tankSeconds / 86_400} days thinned)
  reading them, one row per channel:   wall p50 ${ms(median(after.wall))}; ingest CPU mean ${ms(mean(after.cpu))}
  reading them, one row per sample:    wall p50 ${ms(median(before.wall))}; ingest CPU mean ${ms(mean(before.cpu))}
        CPU ratio (per sample / per channel): ${(mean(before.cpu) / mean(after.cpu)).toFixed(1)}×
  evaluators, CPU mean per evaluation: ${[...kindCpu].map(([k, xs]) => `${k} ${mean(xs).toFixed(2)}`).join(', ')} ms
  one evaluation of the data rules:    ${ms(perEvaluationCpu)} of ingest CPU (reading ${ms(mean(after.cpu))} + evaluators ${ms(dataKindsCpu)}); ${ms(perEvaluationBefore)} with the per-sample read
  PostgreSQL per evaluation (wall less ingest CPU, reading): ${ms(dbPerEvaluation)}
  sites judged every ${MIN_INTERVAL_MS / 1000} s per core:   ingest ${sitesPerCore(perEvaluationCpu).toLocaleString('en-US')} (per-sample read: ${sitesPerCore(perEvaluationBefore).toLocaleString('en-US')}), before any PUBACK work; PostgreSQL ${sitesPerCore(dbPerEvaluation).toLocaleString('en-US')}
`);
} finally {
  pg.destroy();
}

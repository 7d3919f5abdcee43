#!/usr/bin/env node
/**
 * `npm run simulate -- <mode> [options]`: the simulated gateways. See `--help` for every mode
 * and fault; `npm start` runs `demo`.
 */
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { Command } from 'commander';
import { createDb, dataRoot, readDatabaseConfig, repoRoot } from '@wellkept/db';
import { replayAlerts } from './check/alert-replay.js';
import { loadCredentials, loadSimulatorConfig, sitesWithCredentials } from './config/sim-config.js';
import { demoGatewaysFile } from './demo/seed.js';
import { FAULTS, FAULT_KINDS, type ScheduledFault } from './faults/fault-kinds.js';
import { parseFaultFlag, parseInstant, parseSpanSeconds } from './faults/fault-schedule.js';
import { runDemo } from './modes/demo.js';
import { Fleet } from './modes/fleet.js';
import { provisionLoadGateways, runLoad } from './modes/load.js';
import { formatStats } from './modes/status-line.js';

if (existsSync(join(repoRoot, '.env'))) process.loadEnvFile(join(repoRoot, '.env'));

const log = (line: string) => console.log(`[${new Date().toISOString().slice(11, 19)}] ${line}`);
const defaultUrl = `mqtt://127.0.0.1:${process.env.MQTT_PORT ?? 1883}`;

/** Resolves on Ctrl-C or SIGTERM (npm start stops its services with SIGTERM). */
function stopSignal(): Promise<void> {
  return new Promise((resolve) => {
    process.once('SIGINT', () => resolve());
    process.once('SIGTERM', () => resolve());
  });
}

interface CommonOptions {
  url: string;
  config?: string;
  credentials: string;
  site: string[];
  fault: string[];
  interval: string;
  seed?: string;
}

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

function positiveNumber(name: string, text: string): number {
  const n = Number(text);
  if (!(n > 0) || !Number.isFinite(n))
    throw new Error(`${name} must be a positive number, got "${text}"`);
  return n;
}

function withCommon(command: Command): Command {
  return command
    .option('--url <url>', 'MQTT broker of the ingest service', defaultUrl)
    .option('--config <file>', 'JSON file with sites and faults (default: the demo scenario)')
    .option(
      '--credentials <file>',
      "JSON array of { gatewayId, secret } (default: the demo seed's file)",
      demoGatewaysFile(),
    )
    .option('--site <key>', 'simulate only this site (repeatable; default: all)', collect, [])
    .option(
      '--fault <spec>',
      'inject a fault: <site>:<kind>[@<start>][+<duration>][=<target>] (repeatable)',
      collect,
      [],
    )
    .option('--interval <seconds>', 'reporting interval of each gateway', '30')
    .option('--seed <n>', 'seed for weather, water use and sensor noise (default: per site)');
}

function prepare(options: CommonOptions, nowT: number) {
  const config = loadSimulatorConfig(options.config, nowT);
  const keys = config.sites.map((s) => s.key);
  const faults: ScheduledFault[] = [
    ...config.faults,
    ...options.fault.map((f) => parseFaultFlag(f, nowT, keys)),
  ];
  const credentials = loadCredentials(options.credentials);
  const sites = sitesWithCredentials(config.sites, credentials, options.site);
  const seed = options.seed === undefined ? undefined : Number(options.seed);
  if (seed !== undefined && !Number.isInteger(seed)) throw new Error('--seed must be an integer');
  return { sites, faults, seed, report: positiveNumber('--interval', options.interval) };
}

const program = new Command('simulate')
  .description(
    'Simulated Wellkept gateways: off-grid water sites (sun, PV, charge controller, battery, well\n' +
      'and booster pumps, tanks, floats, water use) publishing SenML over MQTT to ingest.',
  )
  .addHelpText(
    'after',
    `
Modes:
  demo       what npm start runs: the demo sites; 30 days of history on the first run, then real time
  run        real time, or accelerated with --speed (never ahead of the wall clock)
  backfill   N days of history as fast as ingest acknowledges, in order
  load       thousands of gateways from one process (the ingest benchmark)
  check      no broker: simulate a site and print the alerts core's rules raise

Faults (--fault <site>:<kind>[@<start>][+<duration>][=<target>], or "faults" in a config file):
${FAULT_KINDS.map((k) => `  ${k.padEnd(25)} ${FAULTS[k].effect}${FAULTS[k].alert ? ` [${FAULTS[k].alert}]` : ''}${FAULTS[k].target ? `\n  ${''.padEnd(25)} target: ${FAULTS[k].target}` : ''}`).join('\n')}
  start: an ISO time or an offset from now (-2d, -90m, +1h; default now); duration: 36h, 10d (default 1d)

Examples:
  npm run simulate -- run --speed 1440 --from -3d
  npm run simulate -- run --fault red-mesa-ranch:float_stuck_closed@-2h+1d=north-float
  npm run simulate -- backfill --days 7 --site cedar-spring
  npm run simulate -- load --gateways 5000 --provision --duration 120
  npm run simulate -- check --site pinon-ridge --fault pinon-ridge:bladder_lost_precharge@-2d+1d --days 3
`,
  )
  .showHelpAfterError();

program
  .command('demo')
  .description('the demo: 30 days of history on first run (then only the gap), then real time')
  .option('--url <url>', 'MQTT broker of the ingest service', defaultUrl)
  .option('--fault <spec>', 'an extra fault (see above; repeatable)', collect, [])
  .option('--interval <seconds>', 'real-time reporting interval', '30')
  .option('--history-interval <seconds>', 'interval of the backfilled history', '60')
  .action(
    async (options: {
      url: string;
      fault: string[];
      interval: string;
      historyInterval: string;
    }) => {
      const { demoSites } = await import('./demo/scenario.js');
      const nowT = Date.now() / 1000;
      const extraFaults = options.fault.map((f) =>
        parseFaultFlag(
          f,
          nowT,
          demoSites.map((s) => s.key),
        ),
      );
      await runDemo({
        url: options.url,
        extraFaults,
        reportSeconds: positiveNumber('--interval', options.interval),
        historySeconds: positiveNumber('--history-interval', options.historyInterval),
        log,
        stopSignal: stopSignal(),
      });
    },
  );

withCommon(program.command('run'))
  .description('real time (--speed 1), or accelerated: simulated time runs --speed times faster')
  .option('--speed <factor>', 'time factor: 1440 is a simulated day per minute', '1')
  .option(
    '--from <time>',
    'simulated start: ISO time or offset (-3d); default: now, or so an accelerated run catches up with now after --for',
  )
  .option('--for <span>', 'stop after this much simulated time (e.g. 2d)')
  .action(async (options: CommonOptions & { speed: string; from?: string; for?: string }) => {
    const nowT = Date.now() / 1000;
    const speed = positiveNumber('--speed', options.speed);
    const span = options.for ? parseSpanSeconds(options.for) : undefined;
    const { sites, faults, seed, report } = prepare(options, nowT);
    // An accelerated run starts in the past so it can run fast without outrunning the clock.
    const startT = options.from
      ? parseInstant(options.from, nowT)
      : speed > 1 && span
        ? nowT - span
        : nowT - report;
    const fleet = new Fleet({
      url: options.url,
      sites,
      faults,
      startT,
      reportSeconds: report,
      log,
      ...(seed !== undefined ? { seed } : {}),
    });
    fleet.connect();
    const stop = stopSignal();
    void stop.then(() => fleet.stop());
    log(
      `running ${sites.length} sites from ${new Date(startT * 1000).toISOString()} at ${speed}× real time`,
    );
    let last = Date.now();
    await fleet.runLive({
      speed,
      ...(span ? { untilT: startT + span } : {}),
      onTick: () => {
        if (Date.now() - last < 10_000) return;
        last = Date.now();
        log(
          `${new Date(fleet.t * 1000).toISOString().slice(0, 16)}Z ${formatStats(fleet.stats())}`,
        );
      },
    });
    await Promise.all(fleet.members.map((m) => m.link.drained(30_000).catch(() => undefined)));
    log(formatStats(fleet.stats()));
    await fleet.stop();
  });

withCommon(program.command('backfill'))
  .description('history as fast as ingest acknowledges: --days N up to now, in order')
  .option('--days <n>', 'days of history (ingest accepts up to 30)', '7')
  .action(async (options: CommonOptions & { days: string }) => {
    const nowT = Date.now() / 1000;
    const days = positiveNumber('--days', options.days);
    if (days > 30) throw new Error('--days: ingest refuses readings more than 30 days old');
    const { sites, faults, seed, report } = prepare(options, nowT);
    const fleet = new Fleet({
      url: options.url,
      sites,
      faults,
      startT: nowT - days * 86_400 + 600,
      reportSeconds: report,
      log,
      ...(seed !== undefined ? { seed } : {}),
    });
    fleet.connect();
    const stop = stopSignal();
    void stop.then(() => fleet.stop());
    const started = Date.now();
    await fleet.backfill(nowT, (t) =>
      log(`${new Date(t * 1000).toISOString().slice(0, 16)}Z ${formatStats(fleet.stats())}`),
    );
    const seconds = (Date.now() - started) / 1000;
    const acked = fleet.stats().reduce((n, s) => n + s.link.ackedReadings, 0);
    log(
      `done in ${seconds.toFixed(1)} s: ${acked} readings acknowledged (${Math.round(acked / seconds)} a second)`,
    );
    await fleet.stop();
  });

program
  .command('load')
  .description('thousands of gateways from one process, reporting in real time')
  .option('--url <url>', 'MQTT broker of the ingest service', defaultUrl)
  .option('--gateways <n>', 'how many gateways', '1000')
  .option(
    '--provision',
    'register the gateways in the database first (DATABASE_URL or the local cluster)',
  )
  .option(
    '--credentials <file>',
    'gateways to use (JSON array of { gatewayId, secret })',
    join(dataRoot(), 'load-gateways.json'),
  )
  .option('--interval <seconds>', 'reporting interval', '30')
  .option('--duration <seconds>', 'how long to run after the ramp', '60')
  .option('--rate <n>', 'new connections per second', '500')
  .action(
    async (options: {
      url: string;
      gateways: string;
      provision?: boolean;
      credentials: string;
      interval: string;
      duration: string;
      rate: string;
    }) => {
      const count = Math.round(positiveNumber('--gateways', options.gateways));
      let gateways;
      if (options.provision) {
        const db = createDb(readDatabaseConfig().url, { max: 2 });
        try {
          gateways = await provisionLoadGateways(db, count);
        } finally {
          await db.destroy();
        }
        mkdirSync(dirname(options.credentials), { recursive: true });
        writeFileSync(options.credentials, JSON.stringify(gateways), { mode: 0o600 });
        log(`registered ${count} load gateways; secrets in ${options.credentials}`);
      } else {
        gateways = loadCredentials(options.credentials).slice(0, count);
        if (gateways.length < count)
          log(`only ${gateways.length} gateways in ${options.credentials}`);
      }
      const result = await runLoad({
        url: options.url,
        gateways,
        reportSeconds: positiveNumber('--interval', options.interval),
        durationSeconds: positiveNumber('--duration', options.duration),
        connectsPerSecond: positiveNumber('--rate', options.rate),
        onProgress: (r) =>
          log(
            `${r.connected}/${r.gateways} connected, ${r.ackedReadings} readings acknowledged, ${r.readingsPerSecond.toFixed(0)}/s, PUBACK p50 ${r.latencyMs.p50?.toFixed(0) ?? '–'} ms`,
          ),
      });
      console.log(JSON.stringify(result, null, 2));
    },
  );

program
  .command('check')
  .description("no broker: simulate sites for a few days and print the alerts core's rules raise")
  .option('--config <file>', 'JSON file with sites and faults (default: the demo scenario)')
  .option('--site <key>', 'only this site (repeatable)', collect, [])
  .option(
    '--fault <spec>',
    'a fault (see above; repeatable); times count from the end of the run',
    collect,
    [],
  )
  .option('--days <n>', 'days to simulate', '3')
  .option('--interval <seconds>', 'reporting interval', '60')
  .action(
    (options: {
      config?: string;
      site: string[];
      fault: string[];
      days: string;
      interval: string;
    }) => {
      const nowT = Math.floor(Date.now() / 1000);
      const config = loadSimulatorConfig(options.config, nowT);
      const keys = config.sites.map((s) => s.key);
      const faults = [...config.faults, ...options.fault.map((f) => parseFaultFlag(f, nowT, keys))];
      const days = positiveNumber('--days', options.days);
      for (const site of config.sites.filter(
        (s) => options.site.length === 0 || options.site.includes(s.key),
      )) {
        const result = replayAlerts({
          site,
          faults,
          fromT: nowT - days * 86_400,
          toT: nowT,
          reportSeconds: positiveNumber('--interval', options.interval),
        });
        console.log(`${site.key}: ${result.changes.length === 0 ? 'no alerts' : ''}`);
        for (const c of result.changes) {
          console.log(
            `  ${new Date(c.t * 1000).toISOString().slice(0, 16)}Z ${c.action.padEnd(5)} ${c.kind} ${c.subject} — ${c.summary}`,
          );
        }
      }
    },
  );

program.parseAsync(process.argv).then(
  () => process.exit(0),
  (error: unknown) => {
    console.error(`simulate: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  },
);

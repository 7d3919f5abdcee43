/**
 * `npm run faults`: the fault runs of issue 9. Starts a throw-away PostgreSQL, the mail catcher,
 * ingest and the API as real processes; gateways publish numbered QoS 1 packs and log every
 * PUBACK while, in turn, PostgreSQL is stopped (immediate) and restarted, ingest is killed
 * (SIGKILL) and restarted, the SMTP server is stopped and restarted while alert mail is due, and
 * the API is restarted under live event streams. Prints one row of figures per fault and exits
 * non-zero when any guarantee broke.
 *
 *   npm run faults                         all four faults
 *   npm run faults -- --only postgres,api  some of them
 *   npm run faults -- --gateways 50 --rate 4 --hold 8
 *   npm run faults -- --load [--connections 10000] [--minutes 10] [--users 50]
 */
import { parseArgs } from 'node:util';
import { FAULTS, FAULT_TITLES, runFaults, type FaultName } from './faults/fault-run.js';
import { runLoad } from './faults/load-run.js';
import { TABLE_LEGEND, faultTable } from './faults/report-table.js';

const { values } = parseArgs({
  options: {
    only: { type: 'string' },
    gateways: { type: 'string', default: '20' },
    rate: { type: 'string', default: '4' },
    'mail-sites': { type: 'string', default: '5' },
    streams: { type: 'string', default: '20' },
    hold: { type: 'string', default: '6' },
    load: { type: 'boolean', default: false },
    connections: { type: 'string', default: '10000' },
    minutes: { type: 'string', default: '10' },
    users: { type: 'string', default: '50' },
    'think-ms': { type: 'string', default: '1000' },
    help: { type: 'boolean', default: false },
  },
});

function count(name: string, value: string | undefined, min = 0): number {
  const n = Number(value);
  if (!Number.isFinite(n) || n < min) {
    console.error(`--${name} must be a number of at least ${min}, got ${JSON.stringify(value)}`);
    process.exit(2);
  }
  return n;
}

const started = Date.now();
const log = (m: string) =>
  console.log(`[faults ${((Date.now() - started) / 1000).toFixed(1).padStart(6)} s] ${m}`);

async function main(): Promise<number> {
  if (values.help) {
    console.log(
      (await import('node:fs')).readFileSync(new URL(import.meta.url), 'utf8').split('*/')[0],
    );
    return 0;
  }
  if (values.load) {
    const result = await runLoad({
      connections: count('connections', values.connections, 1),
      minutes: count('minutes', values.minutes, 0.1),
      users: count('users', values.users, 1),
      thinkMs: count('think-ms', values['think-ms']),
      log,
    });
    return result.errors === 0 && result.missing === 0 ? 0 : 1;
  }
  const faults = (values.only ? values.only.split(',') : [...FAULTS]) as FaultName[];
  for (const f of faults) {
    if (!FAULTS.includes(f)) {
      console.error(`--only: unknown fault "${f}" (known: ${FAULTS.join(', ')})`);
      return 2;
    }
  }
  const hold = count('hold', values.hold, 1) * 1000;
  const rows = await runFaults({
    faults,
    gateways: count('gateways', values.gateways, 1),
    packsPerSecond: count('rate', values.rate, 0.1),
    mailSites: count('mail-sites', values['mail-sites'], 1),
    sseClients: count('streams', values.streams, 1),
    beforeMs: 3000,
    holdMs: hold,
    afterMs: 5000,
    settleMs: 60_000,
    prefix: 'faults',
    log,
  });
  console.log('');
  console.log(faultTable(rows));
  console.log('');
  console.log(TABLE_LEGEND);
  let problems = 0;
  for (const row of rows) {
    for (const p of row.problems) {
      problems += 1;
      console.log(`PROBLEM ${FAULT_TITLES[row.fault]}: ${p}`);
    }
  }
  console.log(problems === 0 ? '\nEvery guarantee held.' : `\n${problems} problem(s).`);
  return problems === 0 ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(`[faults] ${error instanceof Error ? (error.stack ?? error.message) : error}`);
    process.exit(1);
  },
);

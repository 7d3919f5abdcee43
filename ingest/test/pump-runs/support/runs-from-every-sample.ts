import type { Database } from '@wellkept/db';
import { derivePumpRuns, type TimedValue } from '../../../src/pump-runs/derive-pump-runs.js';
import { readingsOf } from '../../support/ingest-harness.js';

/**
 * A pump's runs derived from every stored sample of it at once, with no carry: what the runs
 * ingest keeps sweep by sweep must equal. No tank volumes (the water figures are left out).
 */
export async function runsFromEverySample(
  db: Database,
  pump: { siteId: string; key: string; ratedCurrentA: number },
) {
  const rows = await readingsOf(db, pump.siteId);
  const series = (name: string): TimedValue[] =>
    rows
      .filter((r) => r.name === name && r.value !== null)
      .map((r) => ({ t: r.time.getTime() / 1000, v: r.value! }));
  return derivePumpRuns({
    running: series(`pump/${pump.key}/running`),
    current: series(`pump/${pump.key}/current`),
    flow: [],
    batteryVoltage: series('battery/voltage'),
    tankVolume: [],
    ratedCurrentA: pump.ratedCurrentA,
    maxGapSeconds: 600,
  });
}

import { Inject, Injectable } from '@nestjs/common';
import { tankVolumeFromLevel, type TankConfig } from '@wellkept/core';
import type { Logger } from 'pino';
import type { Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { SiteUpdates, type SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { SWITCH_MAX_GAP_SECONDS } from '../storage/rollup-timing.js';
import { continuePumpRuns, type OpenRunCarry, type TimedValue } from './derive-pump-runs.js';
import {
  PumpRunsRepository,
  type PumpForRuns,
  type RunsReplacement,
} from './pump-runs.repository.js';

/**
 * Pump runs, re-derived incrementally: for each pump of a touched site, from the earliest time
 * that received data (or the start of the run in progress then) up to the roll-up's watermark,
 * like the buckets (a run that ended after it shows as running until the sweep passes its end).
 * A run's figures change while it is open and when late samples arrive, so the runs from that
 * point on are replaced in one transaction; runs before it are left alone. A run in progress is
 * continued from what its earlier samples added up to (its carry), not read again from its start.
 */
@Injectable()
export class PumpRunsService {
  constructor(
    private readonly repository: PumpRunsRepository,
    private readonly siteUpdates: SiteUpdates,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  /** Announces re-derived runs in-process (after the transaction that wrote them committed). */
  emit(updates: readonly SiteUpdatedEvent[]): void {
    this.siteUpdates.emit(updates);
  }

  /**
   * Re-derives the runs of every pump at the given sites from the given times, inside the
   * caller's transaction, so the runs are replaced in the commit that consumes what asked for
   * them (the roll-up's late-minute marks and watermark): a crash in between can no longer lose
   * the re-derivation (found by the fault runs, issue 9). The caller emits `updates` after its
   * commit.
   *
   * `settledBefore` is the time before which no sample can arrive without its minute being
   * marked late again (the roll-up's watermark). Only samples before it are read: a catch-up
   * through a month of history, ten minutes a transaction, used to read every sample from each
   * chunk to now, so it took time in the square of the history. A run still open there keeps
   * what its samples add up to, and the next re-derivation that starts at or after it
   * continues from there instead of reading the run again from its start.
   */
  async rederiveIn(
    trx: Database,
    fromBySite: ReadonlyMap<string, Date>,
    settledBefore: Date,
  ): Promise<{ sites: number; updates: SiteUpdatedEvent[] }> {
    const pumps = await this.repository.pumpsAt([...fromBySite.keys()], trx);
    if (pumps.length === 0) return { sites: 0, updates: [] };
    const overlapping = await this.repository.overlappingRuns(
      pumps.map((p) => ({ pumpId: p.id, from: fromBySite.get(p.siteId)! })),
      SWITCH_MAX_GAP_SECONDS,
      trx,
    );
    const lookBack = (seconds: number) => new Date((seconds - SWITCH_MAX_GAP_SECONDS) * 1000);

    const plans = pumps.map((pump): Plan => {
      const from = fromBySite.get(pump.siteId)!;
      const run = overlapping.get(pump.id);
      const start = run && run.startedAt < from ? run.startedAt : from;
      // Nothing before `from` changed since the carry was kept, so it still holds.
      const carry =
        run?.open && run.carry && run.carry.through * 1000 <= from.getTime() ? run.carry : null;
      const names = [
        `pump/${pump.key}/running`,
        `pump/${pump.key}/current`,
        `pump/${pump.key}/flow`,
        'battery/voltage',
      ];
      if (pump.tank) names.push(`tank/${pump.tank.key}/level`);
      const readFrom = lookBack(carry ? carry.through : start.getTime() / 1000);
      return { pump, start, carry, names, readFrom };
    });

    const changedSites = new Set<string>();
    for (const batch of readTogether(plans, settledBefore.getTime())) {
      const samples = await this.repository.samples(
        batch.flatMap((plan) =>
          plan.names.map((name) => ({
            siteId: plan.pump.siteId,
            name,
            from: plan.readFrom,
            before: settledBefore,
          })),
        ),
        trx,
      );
      let next = 0;
      const replacements = batch.map(({ pump, start, carry, names }): RunsReplacement => {
        const byName = new Map(names.map((name) => [name, samples[next++]!]));
        const series = (name: string) => byName.get(name) ?? [];
        const derived = continuePumpRuns(
          {
            running: series(`pump/${pump.key}/running`),
            current: series(`pump/${pump.key}/current`),
            flow: series(`pump/${pump.key}/flow`),
            batteryVoltage: series('battery/voltage'),
            tankVolume: pump.tank
              ? tankVolumes(pump.tank, series(`tank/${pump.tank.key}/level`))
              : [],
            ratedCurrentA: pump.ratedCurrentA,
            maxGapSeconds: SWITCH_MAX_GAP_SECONDS,
          },
          carry,
          settledBefore.getTime() / 1000,
        );
        changedSites.add(pump.siteId);
        return {
          pump,
          from: start,
          runs: derived.runs.filter((r) => r.startedAt * 1000 >= start.getTime()),
          carry: derived.carry,
        };
      });
      await this.repository.replaceRuns(trx, replacements);
    }
    const at = new Date().toISOString();
    const updates: SiteUpdatedEvent[] = [...changedSites].map((siteId) => ({
      siteId,
      what: ['pump_runs'],
      at,
    }));
    await this.siteUpdates.notifyInTransaction(trx, updates);
    this.logger.debug({ sites: changedSites.size, pumps: pumps.length }, 'pump runs re-derived');
    return { sites: changedSites.size, updates };
  }
}

/** One pump's re-derivation: from where, continuing which carry, reading what from when. */
interface Plan {
  pump: PumpForRuns;
  start: Date;
  carry: OpenRunCarry | null;
  names: string[];
  readFrom: Date;
}

/** Pumps read and written together while their windows add up to at most this, seconds. */
const BATCH_WINDOW_SECONDS = 50 * 3600;
/** And at most this many pumps at a time. */
const BATCH_PUMPS = 500;

/**
 * The re-derivations in batches, shortest reads first. A sweep while pumps run continues each
 * open run from its carry, a read of a few minutes per pump: reading and writing a few hundred
 * pumps in three statements instead of three per pump is most of what such a sweep saves. A run
 * read from its start can mean days of samples (npm start's 30-day demo backfill, read for
 * every pump at once, held 1.5 million rows and ran ingest out of its heap): a window longer
 * than the budget is read on its own.
 */
function* readTogether(plans: readonly Plan[], nowMs: number): Generator<Plan[]> {
  const span = (plan: Plan) => Math.max(0, nowMs - plan.readFrom.getTime()) / 1000;
  const sorted = [...plans].sort((a, b) => span(a) - span(b));
  let batch: Plan[] = [];
  let total = 0;
  for (const plan of sorted) {
    if (
      batch.length > 0 &&
      (total + span(plan) > BATCH_WINDOW_SECONDS || batch.length >= BATCH_PUMPS)
    ) {
      yield batch;
      batch = [];
      total = 0;
    }
    batch.push(plan);
    total += span(plan);
  }
  if (batch.length > 0) yield batch;
}

function tankVolumes(tank: TankConfig, levels: readonly TimedValue[]): TimedValue[] {
  const out: TimedValue[] = [];
  for (const s of levels) {
    const volume = tankVolumeFromLevel(tank, s.v);
    if (volume.ok) out.push({ t: s.t, v: volume.cubicMetres });
  }
  return out;
}

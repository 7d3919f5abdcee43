/**
 * Water delivered by a pump run: from a flow meter when there is one, otherwise from the rise of
 * the tank it fills, allowing for water drawn from the tank while the pump ran.
 */
import { type Sample, sampleAtOrBefore, sortSamples } from '../series.js';
import { type TankConfig, tankVolumeFromLevel } from '../tanks/tank-volume.js';
import type { PumpRun } from './pump-runs.js';

/** Water delivered by one run. */
export interface WaterDelivered {
  /** Best figure, m³, or null when neither flow nor tank data cover the run. */
  cubicMetres: number | null;
  method: 'flow' | 'tank_rise' | null;
  /** Net change of the tank over the run, m³ (tank method). */
  tankRiseCubicMetres: number | null;
  /** Water assumed drawn from the tank during the run, m³ (tank method). */
  drawAllowanceCubicMetres: number | null;
}

/** Flow integrated over [fromT, toT] by the trapezoid rule, m³ (flow samples in m³/s). */
export function integrateFlowCubicMetres(
  flows: readonly Sample[],
  fromT: number,
  toT: number,
): number {
  const points = sortSamples(flows).filter(
    (s) => Number.isFinite(s.v) && s.t >= fromT && s.t <= toT,
  );
  let total = 0;
  for (let i = 1; i < points.length; i += 1) {
    const a = points[i - 1] as Sample;
    const b = points[i] as Sample;
    total += ((a.v + b.v) / 2) * (b.t - a.t);
  }
  return Math.max(total, 0);
}

/**
 * Rate at which the tank was falling before a time (household draw), m³/s, from the level
 * samples in the look-back window; 0 when it was not falling or there are too few samples.
 */
export function drawRateBefore(
  tank: TankConfig,
  levels: readonly Sample[],
  beforeT: number,
  lookbackSeconds = 3600,
): number {
  const window = sortSamples(levels).filter(
    (s) => s.t >= beforeT - lookbackSeconds && s.t <= beforeT,
  );
  const first = window[0];
  const last = window[window.length - 1];
  if (!first || !last || last.t - first.t < 60) return 0;
  const a = tankVolumeFromLevel(tank, first.v);
  const b = tankVolumeFromLevel(tank, last.v);
  if (!a.ok || !b.ok) return 0;
  return Math.max((a.cubicMetres - b.cubicMetres) / (last.t - first.t), 0);
}

/**
 * Water delivered by a run: integrated flow when flow samples cover the run; otherwise the tank's
 * rise from the last level before the start to the first level after the end, plus the draw
 * that went on meanwhile (the draw rate before the run × run time).
 */
export function waterDeliveredByRun(
  run: PumpRun,
  data: { flows?: readonly Sample[]; tank?: TankConfig | null; levels?: readonly Sample[] },
): WaterDelivered {
  const flows = data.flows ?? [];
  const flowsInRun = flows.filter((s) => s.t >= run.startT && s.t <= run.endT);
  if (flowsInRun.length >= 2) {
    return {
      cubicMetres: integrateFlowCubicMetres(flows, run.startT, run.endT),
      method: 'flow',
      tankRiseCubicMetres: null,
      drawAllowanceCubicMetres: null,
    };
  }
  const tank = data.tank;
  const levels = data.levels ?? [];
  if (tank && levels.length > 0) {
    const before = sampleAtOrBefore(levels, run.startT);
    const after = sortSamples(levels).find((s) => s.t >= run.endT) ?? null;
    if (before && after) {
      const a = tankVolumeFromLevel(tank, before.v);
      const b = tankVolumeFromLevel(tank, after.v);
      if (a.ok && b.ok) {
        const rise = b.cubicMetres - a.cubicMetres;
        const draw = drawRateBefore(tank, levels, run.startT) * (after.t - before.t);
        return {
          cubicMetres: Math.max(rise + draw, 0),
          method: 'tank_rise',
          tankRiseCubicMetres: rise,
          drawAllowanceCubicMetres: draw,
        };
      }
    }
  }
  return {
    cubicMetres: null,
    method: null,
    tankRiseCubicMetres: null,
    drawAllowanceCubicMetres: null,
  };
}

/**
 * Water into one tank from several pumps over the same time, attributed per pump (each run's own
 * delivered water). Returns m³ per pump key.
 */
export function waterByPump(
  deliveries: readonly { pumpKey: string; delivered: WaterDelivered }[],
): Record<string, number> {
  const totals: Record<string, number> = {};
  for (const d of deliveries) {
    if (d.delivered.cubicMetres === null) continue;
    totals[d.pumpKey] = (totals[d.pumpKey] ?? 0) + d.delivered.cubicMetres;
  }
  return totals;
}

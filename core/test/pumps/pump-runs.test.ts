import { describe, expect, it } from 'vitest';
import {
  type PumpConfig,
  type Sample,
  type TankConfig,
  detectPumpRuns,
  maxStartsInWindow,
  rebuildStatus,
  waterDeliveredByRun,
  levelFromTankVolume,
} from '../../src/index.js';

const pump: PumpConfig = { key: 'well', ratedCurrentAmps: 8, supplyVolts: 48 };

describe('pump runs', () => {
  it('finds runs from the running switch state, with duration, mean current and energy', () => {
    const running: Sample<boolean>[] = [
      { t: 0, v: false },
      { t: 60, v: true },
      { t: 660, v: false },
      { t: 1000, v: true },
      { t: 1300, v: false },
    ];
    const current: Sample[] = [];
    for (let t = 60; t <= 600; t += 60) current.push({ t, v: 8 });
    const runs = detectPumpRuns(pump, { running, current });
    expect(runs.map((r) => [r.startT, r.endT, r.durationSeconds])).toEqual([
      [60, 660, 600],
      [1000, 1300, 300],
    ]);
    expect(runs[0]?.meanCurrentAmps).toBe(8);
    expect(runs[0]?.energyWattHours).toBeCloseTo((8 * 48 * 600) / 3600, 9);
    expect(runs[1]?.meanCurrentAmps).toBeNull();
  });

  it('without a switch state, uses current above a tenth of rated', () => {
    const current: Sample[] = [0, 0.2, 7.9, 8.1, 8, 0.1, 0].map((v, i) => ({ t: i * 60, v }));
    const runs = detectPumpRuns(pump, { current });
    expect(runs).toHaveLength(1);
    expect(runs[0]).toMatchObject({ startT: 120, endT: 300, spansGap: false, stillRunning: false });
  });

  it('marks a run that spans a data gap instead of guessing, and a run still going', () => {
    const running: Sample<boolean>[] = [
      { t: 0, v: true },
      { t: 60, v: true },
      { t: 5000, v: false },
      { t: 6000, v: true },
      { t: 6060, v: true },
    ];
    const runs = detectPumpRuns(pump, { running });
    expect(runs[0]).toMatchObject({ startT: 0, endT: 5000, spansGap: true });
    expect(runs[1]).toMatchObject({ startT: 6000, endT: 6060, stillRunning: true });
  });

  it('counts the most starts inside a sliding window', () => {
    const running: Sample<boolean>[] = [];
    for (let i = 0; i < 9; i += 1) {
      running.push({ t: 3600 + i * 60, v: true }, { t: 3600 + i * 60 + 30, v: false });
    }
    const runs = detectPumpRuns(pump, { running });
    expect(maxStartsInWindow(runs, 600)).toEqual({ starts: 9, fromT: 3600 });
    expect(maxStartsInWindow(runs, 120).starts).toBe(2);
  });
});

describe('water delivered and run-hours', () => {
  const tank: TankConfig = {
    key: 'main',
    geometry: { shape: 'rectangular', lengthMetres: 2, widthMetres: 2, heightMetres: 2 },
  };
  const level = (m3: number) => levelFromTankVolume(tank, m3) as number;

  it('from tank rise, allowing for the draw that went on during the run', () => {
    // falling 0.1 m³/h before the run; the run lasts 1 h and the tank rises 0.5 m³ net
    const levels: Sample[] = [
      { t: 0, v: level(4.1) },
      { t: 3600, v: level(4.0) },
      { t: 7200, v: level(4.5) },
    ];
    const run = {
      pumpKey: 'well',
      startT: 3600,
      endT: 7200,
      durationSeconds: 3600,
      meanCurrentAmps: 8,
      energyWattHours: null,
      spansGap: false,
      stillRunning: false,
    };
    const delivered = waterDeliveredByRun(run, { tank, levels });
    expect(delivered.method).toBe('tank_rise');
    expect(delivered.tankRiseCubicMetres).toBeCloseTo(0.5, 9);
    expect(delivered.drawAllowanceCubicMetres).toBeCloseTo(0.1, 9);
    expect(delivered.cubicMetres).toBeCloseTo(0.6, 9);
  });

  it('from a flow meter when there is one', () => {
    const run = {
      pumpKey: 'well',
      startT: 0,
      endT: 600,
      durationSeconds: 600,
      meanCurrentAmps: 8,
      energyWattHours: null,
      spansGap: false,
      stillRunning: false,
    };
    const flows = [0, 300, 600].map((t) => ({ t, v: 0.0005 }));
    const delivered = waterDeliveredByRun(run, { flows });
    expect(delivered).toMatchObject({ method: 'flow' });
    expect(delivered.cubicMetres).toBeCloseTo(0.3, 9);
  });

  it('run-hours since the last rebuild, and when a rebuild is due', () => {
    const runs = [0, 1, 2].map((i) => ({
      pumpKey: 'well',
      startT: i * 86400,
      endT: i * 86400 + 7200,
      durationSeconds: 7200,
      meanCurrentAmps: null,
      energyWattHours: null,
      spansGap: false,
      stillRunning: false,
    }));
    expect(rebuildStatus(runs, 0, 3 * 86400, 10)).toEqual({
      runHours: 6,
      hoursRemaining: 4,
      due: false,
    });
    expect(rebuildStatus(runs, 0, 3 * 86400, 10, 5).due).toBe(true);
    expect(rebuildStatus(runs, 86400 + 3600, 3 * 86400, null).runHours).toBe(3);
  });
});

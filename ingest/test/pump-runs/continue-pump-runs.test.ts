import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  continuePumpRuns,
  derivePumpRuns,
  type PumpRunInputs,
  type TimedValue,
} from '../../src/pump-runs/derive-pump-runs.js';

const GAP = 600;

/** A pump's samples: a switch (or none, then current against rating), current, volts, flow, tank. */
const inputsArbitrary = fc
  .record({
    hasSwitch: fc.boolean(),
    hasFlow: fc.boolean(),
    // Steps between samples, mostly 30 s, sometimes past the gap.
    steps: fc.array(fc.oneof(fc.constant(30), fc.integer({ min: 1, max: 900 })), {
      minLength: 5,
      maxLength: 120,
    }),
    // On and off in stretches (a run lasting many samples is what a carry continues).
    stretches: fc.array(fc.integer({ min: 1, max: 60 }), { minLength: 1, maxLength: 12 }),
    startsOn: fc.boolean(),
    amps: fc.array(fc.double({ min: 0, max: 12, noNaN: true }), { minLength: 120, maxLength: 120 }),
    volts: fc.array(fc.double({ min: 22, max: 29, noNaN: true }), {
      minLength: 120,
      maxLength: 120,
    }),
  })
  .map(({ hasSwitch, hasFlow, steps, stretches, startsOn, amps, volts }): PumpRunInputs => {
    const on = stretches.flatMap((length, i) =>
      Array.from({ length }, () => (i % 2 === 0) === startsOn),
    );
    let t = 1_800_000_000;
    const times = steps.map((step) => (t += step));
    const series = (value: (i: number) => number): TimedValue[] =>
      times.map((time, i) => ({ t: time, v: value(i) }));
    let level = 3;
    return {
      running: hasSwitch ? series((i) => (on[i] ? 1 : 0)) : [],
      current: series((i) => (on[i] ? amps[i]! : amps[i]! / 100)),
      flow: hasFlow ? series((i) => (on[i] ? amps[i]! / 4000 : 0)) : [],
      batteryVoltage: series((i) => volts[i]!),
      tankVolume: series((i) => (level += on[i] ? 0.01 : -0.004)),
      ratedCurrentA: 8,
      maxGapSeconds: GAP,
    };
  });

/** The inputs as a gateway had sent them by `before` (samples before it, nothing after). */
function sentBefore(inputs: PumpRunInputs, before: number, from = Number.NEGATIVE_INFINITY) {
  const cut = (xs: readonly TimedValue[]) => xs.filter((s) => s.t < before && s.t >= from);
  return {
    ...inputs,
    running: cut(inputs.running),
    current: cut(inputs.current),
    flow: cut(inputs.flow),
    batteryVoltage: cut(inputs.batteryVoltage),
    tankVolume: cut(inputs.tankVolume),
  };
}

describe('continuing an open pump run from its carry', () => {
  it('gives the runs a derivation from the start with every sample gives, over several sweeps', () => {
    fc.assert(
      fc.property(
        inputsArbitrary,
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 2, maxLength: 6 }),
        (inputs, fractions) => {
          const all = inputs.current.map((s) => s.t);
          const first = all[0]!;
          const last = all[all.length - 1]! + 1;
          // Sweeps at increasing times; each carries the open run up to a little before it (the
          // roll-up's watermark trails what has been read).
          const sweeps = [...fractions]
            .sort((a, b) => a - b)
            .map((f) => first + f * (last - first));
          let carry = null;
          for (const now of [...sweeps, last]) {
            const through = now - 45;
            const read = carry
              ? sentBefore(inputs, now, carry.through - GAP)
              : sentBefore(inputs, now);
            const continued = continuePumpRuns(read, carry, through);
            const expected = derivePumpRuns(sentBefore(inputs, now)).filter(
              (r) => r.startedAt >= (carry?.startedAt ?? Number.NEGATIVE_INFINITY),
            );
            expect(continued.runs).toEqual(expected);
            const open = expected.at(-1);
            if (continued.carry) {
              expect(open?.endedAt).toBeNull();
              expect(continued.carry.startedAt).toBe(open?.startedAt);
              expect(continued.carry.through).toBeLessThanOrEqual(through);
            }
            carry = continued.carry;
          }
        },
      ),
      { numRuns: 400 },
    );
  });

  it('reads only what came after the carry for a pump left on for days', () => {
    // A switch stuck on: every 30 s for three days, then off.
    const start = 1_800_000_000;
    const times = Array.from({ length: 3 * 2880 + 2 }, (_, i) => start + 30 * i);
    const series = (v: (t: number, i: number) => number) =>
      times.map((t, i) => ({ t, v: v(t, i) }));
    const inputs: PumpRunInputs = {
      running: series((_, i) => (i === times.length - 1 ? 0 : 1)),
      current: series((_, i) => 5 + (i % 7) / 10),
      flow: [],
      batteryVoltage: series((_, i) => 25 + (i % 5) / 10),
      tankVolume: series((_, i) => 1 + i / 1000),
      ratedCurrentA: 8,
      maxGapSeconds: GAP,
    };
    const end = times.at(-1)!;
    // A sweep every hour, each reading from its carry on.
    let carry = continuePumpRuns(sentBefore(inputs, start + 3600), null, start + 3500).carry;
    let mostRead = 0;
    for (let now = start + 7200; now < end + 3600; now += 3600) {
      const read = sentBefore(inputs, Math.min(now, end + 1), carry!.through - GAP);
      mostRead = Math.max(mostRead, read.current.length);
      const continued = continuePumpRuns(read, carry, now - 100);
      expect(continued.runs).toEqual(derivePumpRuns(sentBefore(inputs, Math.min(now, end + 1))));
      if (now < end) expect(continued.carry).toMatchObject({ startedAt: start, spansGap: false });
      carry = continued.carry;
    }
    // Each sweep read one hour, the 100 s its carry trails by and the gap before it, not the days since the pump started.
    expect(mostRead).toBeLessThanOrEqual((3600 + 100 + GAP) / 30 + 1);
    const [run] = derivePumpRuns(inputs);
    expect(run).toMatchObject({ startedAt: start, endedAt: end, durationS: end - start });
    expect(run!.waterSource).toBe('tank_rise');
    expect(run!.waterM3).toBeCloseTo((times.length - 1) / 1000, 9);
    expect(carry).toBeNull();
  });

  it('carries a gap seen before the carry into the run it continues', () => {
    const t = 1_800_000_000;
    const running = [t, t + 30, t + 30 + GAP + 1, t + 2000, t + 2030].map((time, i) => ({
      t: time,
      v: i === 4 ? 0 : 1,
    }));
    const inputs: PumpRunInputs = {
      running,
      current: running.map((s) => ({ t: s.t, v: 6 })),
      flow: [],
      batteryVoltage: running.map((s) => ({ t: s.t, v: 25 })),
      tankVolume: [],
      ratedCurrentA: 8,
      maxGapSeconds: GAP,
    };
    const { carry } = continuePumpRuns(sentBefore(inputs, t + 1000), null, t + 900);
    expect(carry).toMatchObject({ spansGap: true, lastSwitchT: t + 30 + GAP + 1 });
    const [run] = continuePumpRuns(sentBefore(inputs, t + 3000, t + 300), carry, null).runs;
    expect(run).toMatchObject({ endedAt: t + 2030, spansGap: true, meanCurrentA: 6 });
  });
});

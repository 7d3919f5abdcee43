/**
 * The water a site uses: individual draws (a tap, a toilet, a shower or a load of washing; for
 * stock, animals drinking at the trough) placed at random in five-minute slots, more of them in
 * the morning and evening peaks of the site's local day. Each slot's draws come from a hash of
 * (seed, slot), so the demand at any instant can be asked for directly.
 */
import { timeZoneOffsetSeconds } from '@wellkept/core';
import { hashUnit } from '../random.js';

const SLOT_SECONDS = 300;
/** The longest draw, seconds: how many earlier slots can still be running. */
const LONGEST_DRAW_SECONDS = 900;

export type UseProfile = 'household' | 'cabin' | 'livestock';

/** Share of the day's water used in each local hour (0–23), before normalising. */
const HOURLY_WEIGHTS: Record<UseProfile, readonly number[]> = {
  // Morning and evening peaks, quiet at night.
  household: [
    0.2, 0.1, 0.1, 0.1, 0.2, 0.6, 2.2, 3.2, 2.6, 1.5, 1.1, 1.0, 1.2, 1.0, 0.9, 0.9, 1.1, 1.8, 2.6,
    2.8, 2.2, 1.4, 0.8, 0.4,
  ],
  cabin: [
    0.1, 0.1, 0.1, 0.1, 0.1, 0.2, 0.8, 2.4, 3.0, 2.0, 1.2, 0.9, 1.2, 0.8, 0.7, 0.8, 1.0, 1.6, 2.6,
    3.0, 2.4, 1.6, 0.8, 0.3,
  ],
  // Stock drink through the day, most in the morning and late afternoon.
  livestock: [
    0.3, 0.2, 0.2, 0.2, 0.3, 0.8, 1.8, 2.2, 2.0, 1.6, 1.5, 1.4, 1.4, 1.4, 1.5, 1.7, 2.0, 2.2, 1.8,
    1.1, 0.6, 0.4, 0.3, 0.3,
  ],
};

interface DrawKind {
  share: number;
  litres: [number, number];
  litresPerSecond: [number, number];
}

const DRAW_KINDS: Record<UseProfile, readonly DrawKind[]> = {
  household: [
    { share: 0.6, litres: [0.5, 4], litresPerSecond: [0.08, 0.15] }, // tap
    { share: 0.25, litres: [5, 7], litresPerSecond: [0.1, 0.15] }, // toilet refill
    { share: 0.15, litres: [35, 75], litresPerSecond: [0.11, 0.16] }, // shower or washing
  ],
  cabin: [
    { share: 0.7, litres: [0.5, 3], litresPerSecond: [0.06, 0.12] },
    { share: 0.2, litres: [4, 6], litresPerSecond: [0.08, 0.12] },
    { share: 0.1, litres: [25, 45], litresPerSecond: [0.09, 0.13] },
  ],
  livestock: [{ share: 1, litres: [20, 80], litresPerSecond: [0.15, 0.3] }],
};

interface Draw {
  startT: number;
  endT: number;
  cubicMetresPerSecond: number;
}

export interface WaterUseSettings {
  seed: number;
  dailyCubicMetres: number;
  profile: UseProfile;
  timeZone: string;
}

export class WaterUse {
  private readonly weights: number[];
  private readonly meanDrawLitres: number;
  private readonly slots = new Map<number, Draw[]>();
  private readonly offsets = new Map<number, number>();

  constructor(private readonly settings: WaterUseSettings) {
    const raw = HOURLY_WEIGHTS[settings.profile];
    const total = raw.reduce((a, b) => a + b, 0);
    this.weights = raw.map((w) => w / total);
    this.meanDrawLitres = DRAW_KINDS[settings.profile].reduce(
      (sum, k) => sum + k.share * ((k.litres[0] + k.litres[1]) / 2),
      0,
    );
  }

  /** The house's (or the trough's) demand at an instant, m³/s. */
  demandAt(epochSeconds: number): number {
    const slot = Math.floor(epochSeconds / SLOT_SECONDS);
    let flow = 0;
    for (let s = slot - Math.ceil(LONGEST_DRAW_SECONDS / SLOT_SECONDS); s <= slot; s += 1) {
      for (const d of this.draws(s)) {
        if (d.startT <= epochSeconds && epochSeconds < d.endT) flow += d.cubicMetresPerSecond;
      }
    }
    return flow;
  }

  private localHour(epochSeconds: number): number {
    const hourIndex = Math.floor(epochSeconds / 3600);
    let offset = this.offsets.get(hourIndex);
    if (offset === undefined) {
      offset = timeZoneOffsetSeconds(this.settings.timeZone, hourIndex * 3600);
      if (this.offsets.size > 1000) this.offsets.clear();
      this.offsets.set(hourIndex, offset);
    }
    return Math.floor(((((epochSeconds + offset) % 86_400) + 86_400) % 86_400) / 3600);
  }

  private draws(slot: number): Draw[] {
    let draws = this.slots.get(slot);
    if (draws) return draws;
    draws = [];
    const seed = this.settings.seed;
    const slotStart = slot * SLOT_SECONDS;
    const day = Math.floor(slotStart / 86_400);
    const dayFactor = 0.75 + 0.5 * hashUnit(seed, 21, day);
    const hour = this.localHour(slotStart);
    const litres =
      this.settings.dailyCubicMetres *
      1000 *
      dayFactor *
      (this.weights[hour] ?? 0) *
      (SLOT_SECONDS / 3600);
    // Poisson number of draws by inverse transform on one hashed uniform.
    const lambda = litres / this.meanDrawLitres;
    const u = hashUnit(seed, 22, slot);
    let count = 0;
    let p = Math.exp(-lambda);
    let cumulative = p;
    while (u > cumulative && count < 50) {
      count += 1;
      p *= lambda / count;
      cumulative += p;
    }
    const kinds = DRAW_KINDS[this.settings.profile];
    for (let i = 0; i < count; i += 1) {
      const pick = hashUnit(seed, 23, slot, i);
      let kind = kinds[kinds.length - 1] as DrawKind;
      let acc = 0;
      for (const k of kinds) {
        acc += k.share;
        if (pick < acc) {
          kind = k;
          break;
        }
      }
      const volume =
        kind.litres[0] + (kind.litres[1] - kind.litres[0]) * hashUnit(seed, 24, slot, i);
      const rate =
        kind.litresPerSecond[0] +
        (kind.litresPerSecond[1] - kind.litresPerSecond[0]) * hashUnit(seed, 25, slot, i);
      const startT = slotStart + SLOT_SECONDS * hashUnit(seed, 26, slot, i);
      const seconds = Math.min(volume / rate, LONGEST_DRAW_SECONDS);
      draws.push({ startT, endT: startT + seconds, cubicMetresPerSecond: rate / 1000 });
    }
    if (this.slots.size > 500) this.slots.clear();
    this.slots.set(slot, draws);
    return draws;
  }
}

/**
 * Seeded weather for one site: spells of clear, broken and overcast days, passing clouds on
 * broken days, and air temperature with its seasonal and daily swing. Everything is a function
 * of (seed, time) through hashes, so any moment can be asked for without replaying the past.
 */
import { hashUnit } from '../random.js';

const DAY = 86_400;
const SPELL_DAYS = 2.5;
const CLOUD_SLOT_SECONDS = 600;

export type Sky = 'clear' | 'broken' | 'overcast';

export interface WeatherSettings {
  seed: number;
  latitudeDegrees: number;
  longitudeDegrees: number;
  elevationMetres: number;
  /** 0 (desert sun) to 1 (cloudy climate). Default 0.3. */
  cloudiness?: number;
}

function smooth(x: number): number {
  return x * x * (3 - 2 * x);
}

export class Weather {
  private readonly cloudiness: number;
  private readonly solarOffsetSeconds: number;
  private readonly annualMeanCelsius: number;
  private readonly seasonalSwingCelsius: number;
  private readonly warmestDayOfYear: number;

  constructor(private readonly settings: WeatherSettings) {
    this.cloudiness = Math.min(1, Math.max(0, settings.cloudiness ?? 0.3));
    this.solarOffsetSeconds = (settings.longitudeDegrees / 15) * 3600;
    const absLat = Math.abs(settings.latitudeDegrees);
    this.annualMeanCelsius =
      30 - 0.35 * Math.max(absLat - 10, 0) - (5 * Math.max(settings.elevationMetres, 0)) / 1000;
    this.seasonalSwingCelsius = 3 + 0.3 * absLat;
    this.warmestDayOfYear = settings.latitudeDegrees >= 0 ? 200 : 17;
  }

  /** The local solar day number (days since the epoch, starting at solar midnight). */
  solarDay(epochSeconds: number): number {
    return Math.floor((epochSeconds + this.solarOffsetSeconds) / DAY);
  }

  /** How cloudy a whole day is, 0–1: slow spells plus a day-to-day part. */
  private dayCloudIndex(day: number): number {
    const x = day / SPELL_DAYS;
    const k = Math.floor(x);
    const a = hashUnit(this.settings.seed, 11, k);
    const b = hashUnit(this.settings.seed, 11, k + 1);
    const spell = a + (b - a) * smooth(x - k);
    return 0.65 * spell + 0.35 * hashUnit(this.settings.seed, 12, day);
  }

  sky(epochSeconds: number): Sky {
    const index = this.dayCloudIndex(this.solarDay(epochSeconds));
    const clearBelow = 0.72 - 0.35 * this.cloudiness;
    const overcastAbove = 0.9 - 0.25 * this.cloudiness;
    if (index < clearBelow) return 'clear';
    return index > overcastAbove ? 'overcast' : 'broken';
  }

  /**
   * Clearness: the share of the clear-sky irradiance that reaches the ground, 0.1–1. Broken days
   * alternate sun and cloud in ten-minute slots; overcast days stay dim all day.
   */
  clearness(epochSeconds: number): number {
    const day = this.solarDay(epochSeconds);
    const dayShade = hashUnit(this.settings.seed, 13, day);
    switch (this.sky(epochSeconds)) {
      case 'clear':
        return 0.95 + 0.05 * dayShade;
      case 'overcast':
        return 0.15 + 0.2 * dayShade;
      case 'broken': {
        const slot = Math.floor(epochSeconds / CLOUD_SLOT_SECONDS);
        const cloudy = hashUnit(this.settings.seed, 14, slot) < 0.3 + 0.3 * dayShade;
        return cloudy ? 0.3 + 0.15 * hashUnit(this.settings.seed, 15, slot) : 0.92;
      }
    }
  }

  /** Air temperature, °C: the season, the day's own anomaly, and the daily swing. */
  airCelsius(epochSeconds: number): number {
    const dayOfYear = (epochSeconds / DAY) % 365.2425;
    const season = Math.cos((2 * Math.PI * (dayOfYear - this.warmestDayOfYear)) / 365.2425);
    const day = this.solarDay(epochSeconds);
    const anomaly = (hashUnit(this.settings.seed, 16, Math.floor(day / 3)) - 0.5) * 6;
    const sky = this.sky(epochSeconds);
    const swing = sky === 'clear' ? 8 : sky === 'broken' ? 6 : 3;
    // Coolest just before dawn (06:00 solar), warmest mid-afternoon (15:00 solar).
    const solarHour = ((((epochSeconds + this.solarOffsetSeconds) % DAY) + DAY) % DAY) / 3600;
    const phase = ((solarHour - 15) / 24) * 2 * Math.PI;
    return (
      this.annualMeanCelsius +
      this.seasonalSwingCelsius * season +
      anomaly +
      swing * Math.cos(phase) -
      (sky === 'overcast' ? 2 : 0)
    );
  }
}

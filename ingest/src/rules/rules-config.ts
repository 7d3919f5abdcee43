import { z } from 'zod';

const rulesEnv = z.object({
  /** Quiet time after a site's data commit before its rules run (coalesces backfills), ms. */
  RULES_DEBOUNCE_MS: z.coerce.number().int().min(0).max(600_000).default(5_000),
  /**
   * A site's data rules run at most this often however often it reports, ms. Each run reads a
   * day of the site's raw readings, so this bounds the rules' load by the number of sites.
   */
  RULES_MIN_INTERVAL_MS: z.coerce.number().int().min(0).max(3_600_000).default(120_000),
  /** How often the time-based rules run (gateway silent, overnight sag at dawn …), ms. */
  RULES_TICK_MS: z.coerce.number().int().min(100).max(3_600_000).default(60_000),
  /** A site without new data still gets a full evaluation this often, ms. */
  RULES_FULL_EVERY_MS: z.coerce.number().int().min(1000).max(86_400_000).default(300_000),
  /** A fault that returns within this many hours of clearing reopens the same alert. */
  RULES_REOPEN_WITHIN_H: z.coerce
    .number()
    .min(0)
    .max(24 * 30)
    .default(12),
  /** Overnight sag is judged this long after the site's sunrise (late data can arrive), s. */
  RULES_DAWN_GRACE_S: z.coerce
    .number()
    .int()
    .min(0)
    .max(6 * 3600)
    .default(1800),
  /** Sites evaluated at the same time. */
  RULES_CONCURRENCY: z.coerce.number().int().min(1).max(32).default(2),
});

/** Settings of the rules module. */
export interface RulesConfig {
  debounceMs: number;
  minIntervalMs: number;
  tickMs: number;
  fullEveryMs: number;
  reopenWithinSeconds: number;
  dawnGraceSeconds: number;
  concurrency: number;
}

/** Reads and validates the rules settings once; a bad value names the variable. */
export function readRulesConfig(env: NodeJS.ProcessEnv = process.env): RulesConfig {
  const parsed = rulesEnv.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid rules settings in the environment:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  return {
    debounceMs: e.RULES_DEBOUNCE_MS,
    minIntervalMs: e.RULES_MIN_INTERVAL_MS,
    tickMs: e.RULES_TICK_MS,
    fullEveryMs: e.RULES_FULL_EVERY_MS,
    reopenWithinSeconds: e.RULES_REOPEN_WITHIN_H * 3600,
    dawnGraceSeconds: e.RULES_DAWN_GRACE_S,
    concurrency: e.RULES_CONCURRENCY,
  };
}

/** Injection token for {@link RulesConfig}. */
export const RULES_CONFIG = Symbol('RULES_CONFIG');

import { z } from 'zod';

export const HEALTH = ['act', 'silent', 'watch', 'steady'] as const;
export type Health = (typeof HEALTH)[number];

export const fleetSiteSchema = z.object({
  id: z.string(),
  name: z.string(),
  locality: z.string(),
  /** steady: nothing open; watch: a warning open; act: needs action now; silent: no data. */
  health: z.enum(HEALTH),
  healthReason: z.string(),
  lastSeenAt: z.date().nullable(),
  openAlerts: z.object({ count: z.number(), kinds: z.array(z.string()) }),
  battery: z
    .object({
      /** Best estimate 0–100, null when the voltage cannot tell (e.g. LiFePO4 plateau). */
      stateOfChargePercent: z.number().nullable(),
      lowPercent: z.number(),
      highPercent: z.number(),
      confidence: z.enum(['good', 'wide', 'indeterminate']),
      volts: z.number().nullable(),
      at: z.date().nullable(),
    })
    .nullable(),
  water: z
    .object({
      storedM3: z.number(),
      capacityM3: z.number(),
      percent: z.number(),
      /** Days until empty at the last 7 days' average use; null when use is not measurable. */
      daysLeft: z.number().nullable(),
      at: z.date().nullable(),
    })
    .nullable(),
  /** 24 hourly means (oldest first, null for hours without data) of `spark.measurement`. */
  spark: z
    .object({ measurement: z.string(), unit: z.string(), values: z.array(z.number().nullable()) })
    .nullable(),
});
export type FleetSite = z.infer<typeof fleetSiteSchema>;

export const fleetResponse = z.object({
  generatedAt: z.date(),
  /** Start of the first spark hour, ms since the epoch; each spark value covers one hour. */
  sparkStart: z.number(),
  /** Sites in each health state over the whole fleet (every page). */
  counts: z.object({ act: z.number(), silent: z.number(), watch: z.number(), steady: z.number() }),
  page: z.object({ limit: z.number(), offset: z.number(), total: z.number() }),
  /** This page of sites, worst first (act, silent, watch, steady), then by name. */
  sites: z.array(fleetSiteSchema),
});
export type FleetResponse = z.infer<typeof fleetResponse>;

export const fleetQuery = z.object({
  /** Sites per page (default 200; up to 5,000 for a whole fleet at once). */
  limit: z.coerce.number().int().min(1).max(5000).default(200),
  offset: z.coerce.number().int().min(0).default(0),
});
export type FleetQuery = z.infer<typeof fleetQuery>;

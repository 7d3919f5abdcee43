/**
 * What the simulator needs to know about a site: the same equipment the database holds (see the
 * demo scenario), plus how the site uses water and how cloudy its climate is. Sites come from
 * the demo scenario or from a config file, checked by the schema below.
 */
import { z } from 'zod';

const key = z
  .string()
  .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,39}$/, 'an equipment key: letters, digits, - and _');
const positive = z.number().positive();

export const pumpSpecSchema = z.object({
  key,
  name: z.string().min(1),
  kind: z.enum(['well', 'booster', 'transfer']),
  supply: z.enum(['battery', 'pv_direct']),
  ratedCurrentA: positive,
  ratedFlowM3s: positive.optional(),
  motorPowerW: positive.optional(),
  rebuildIntervalH: positive.optional(),
  fillsTank: key.optional(),
  drawsFromTank: key.optional(),
});

export const tankSpecSchema = z.object({
  key,
  name: z.string().min(1),
  kind: z.enum(['storage', 'pressure']),
  geometry: z.enum(['vertical_cylinder', 'horizontal_cylinder', 'rectangular']).optional(),
  diameterM: positive.optional(),
  lengthM: positive.optional(),
  widthM: positive.optional(),
  heightM: positive.optional(),
  sensorOffsetM: z.number().optional(),
  capacityM3: positive.optional(),
  prechargePa: positive.optional(),
  cutInPa: positive.optional(),
  cutOutPa: positive.optional(),
});

export const siteSpecSchema = z.object({
  key,
  name: z.string().min(1),
  locality: z.string(),
  latitude: z.number().min(-90).max(90),
  longitude: z.number().min(-180).max(180),
  elevationM: z.number(),
  timeZone: z.string().min(1),
  notes: z.string(),
  battery: z
    .object({
      chemistry: z.enum(['flooded', 'agm', 'gel', 'lifepo4']),
      nominalVoltageV: z.union([z.literal(12), z.literal(24), z.literal(48)]),
      /** Capacity of the whole bank, amp-hours. */
      capacityAh: positive,
      strings: z.number().int().min(1),
    })
    .optional(),
  pvArrays: z.array(
    z.object({
      key,
      name: z.string().min(1),
      ratedW: positive,
      purpose: z.enum(['battery_charging', 'pump_direct']),
      pump: key.optional(),
    }),
  ),
  pumps: z.array(pumpSpecSchema),
  tanks: z.array(tankSpecSchema),
  floats: z.array(
    z.object({
      key,
      name: z.string().min(1),
      tank: key,
      pump: key,
      logic: z.enum(['closes_on_low', 'opens_on_high']),
    }),
  ),
  well: z
    .object({
      depthM: positive,
      casingDiameterM: positive,
      staticLevelM: z.number().min(0),
      pumpSettingM: positive,
    })
    .optional(),
  gatewayId: z.string().regex(/^[a-z0-9][a-z0-9-]{2,63}$/, 'a gateway id such as gw-0042'),
  /** How the site uses water; defaults from its build. */
  waterUse: z
    .object({
      dailyCubicMetres: z.number().min(0),
      profile: z.enum(['household', 'cabin', 'livestock']),
    })
    .optional(),
  /** 0 (desert sun) to 1 (cloudy climate). Default 0.3. */
  cloudiness: z.number().min(0).max(1).optional(),
  /** Faults under way in the demo (see simulator/src/faults). */
  faults: z
    .array(
      z.object({
        kind: z.string(),
        startDaysAgo: z.number(),
        durationHours: positive,
        target: key.optional(),
      }),
    )
    .optional(),
});

export type SiteSpec = z.infer<typeof siteSpecSchema>;
export type PumpSpec = z.infer<typeof pumpSpecSchema>;
export type TankSpec = z.infer<typeof tankSpecSchema>;

import { z } from 'zod';
import { uuid } from '../../common/schemas.js';

const key = z
  .string()
  .regex(
    /^[a-z0-9][a-z0-9_-]{0,31}$/,
    'must be 1–32 lower-case letters, digits, - or _ (the <key> in telemetry names)',
  );
const name = z.string().trim().min(1, 'must not be empty').max(200);
const notes = z.string().max(5000);
const positive = (what: string) => z.number().positive(`${what} must be greater than zero`);

export const pumpBody = z.object({
  key,
  name,
  kind: z.enum(['well', 'booster', 'transfer']),
  supply: z.enum(['battery', 'pv_direct']),
  ratedCurrentA: positive('rated current'),
  ratedFlowM3s: positive('rated flow').nullable().optional(),
  motorPowerW: positive('motor power').nullable().optional(),
  rebuildIntervalH: positive('rebuild interval').nullable().optional(),
  lastRebuildAt: z.iso.datetime({ offset: true }).nullable().optional(),
  fillsTankId: uuid().nullable().optional(),
  drawsFromTankId: uuid().nullable().optional(),
  notes: notes.optional(),
});

const tankFields = {
  key,
  name,
  kind: z.enum(['storage', 'pressure']),
  geometry: z
    .enum(['vertical_cylinder', 'horizontal_cylinder', 'rectangular'])
    .nullable()
    .optional(),
  diameterM: positive('diameter').nullable().optional(),
  lengthM: positive('length').nullable().optional(),
  widthM: positive('width').nullable().optional(),
  heightM: positive('height').nullable().optional(),
  sensorOffsetM: z.number().min(-10).max(10).optional(),
  capacityM3: positive('capacity').nullable().optional(),
  prechargePa: positive('precharge').nullable().optional(),
  cutInPa: positive('cut-in pressure').nullable().optional(),
  cutOutPa: positive('cut-out pressure').nullable().optional(),
  notes: notes.optional(),
};

/** What each tank needs, said per field rather than as one database constraint. */
export function tankProblems(
  t: Partial<Record<keyof typeof tankFields, unknown>>,
): { path: string; message: string }[] {
  const need = (field: string, why: string) =>
    t[field as keyof typeof tankFields] == null
      ? [{ path: field, message: `required ${why}` }]
      : [];
  if (t.kind === 'storage') {
    if (!t.geometry) return [{ path: 'geometry', message: 'required for a storage tank' }];
    if (t.geometry === 'vertical_cylinder')
      return [
        ...need('diameterM', 'for an upright cylinder'),
        ...need('heightM', 'for an upright cylinder'),
      ];
    if (t.geometry === 'horizontal_cylinder')
      return [
        ...need('diameterM', 'for a horizontal cylinder'),
        ...need('lengthM', 'for a horizontal cylinder'),
      ];
    return [
      ...need('lengthM', 'for a rectangular tank'),
      ...need('widthM', 'for a rectangular tank'),
      ...need('heightM', 'for a rectangular tank'),
    ];
  }
  if (t.kind === 'pressure') {
    const problems = [
      ...need('capacityM3', 'for a pressure tank'),
      ...need('prechargePa', 'for a pressure tank'),
      ...need('cutInPa', 'for a pressure tank'),
      ...need('cutOutPa', 'for a pressure tank'),
    ];
    if (!problems.length && Number(t.cutOutPa) <= Number(t.cutInPa)) {
      problems.push({ path: 'cutOutPa', message: 'must be above the cut-in pressure' });
    }
    return problems;
  }
  return [];
}

export const tankBody = z.object(tankFields).superRefine((t, ctx) => {
  for (const p of tankProblems(t))
    ctx.addIssue({ code: 'custom', path: [p.path], message: p.message });
});
export const tankPatch = z.object(tankFields).partial();

export const pvArrayBody = z.object({
  key,
  name,
  ratedW: positive('rated power'),
  purpose: z.enum(['battery_charging', 'pump_direct']),
  pumpId: uuid().nullable().optional(),
  tiltDeg: z.number().min(0).max(90).optional(),
  azimuthDeg: z.number().min(0).lt(360).optional(),
  notes: notes.optional(),
});

export const floatSwitchBody = z.object({
  key,
  name,
  tankId: uuid(),
  pumpId: uuid().nullable().optional(),
  logic: z.enum(['closes_on_low', 'opens_on_high']),
  notes: notes.optional(),
});

export const batteryBankBody = z.object({
  name: name.optional(),
  chemistry: z.enum(['flooded', 'agm', 'gel', 'lifepo4']),
  nominalVoltageV: z.union([z.literal(12), z.literal(24), z.literal(36), z.literal(48)], {
    message: 'must be 12, 24, 36 or 48',
  }),
  capacityAh: positive('capacity'),
  strings: z.number().int().min(1).max(16).optional(),
  installedOn: z.iso.date().nullable().optional(),
  notes: notes.optional(),
});

export const wellBody = z
  .object({
    depthM: positive('depth'),
    casingDiameterM: positive('casing diameter'),
    staticLevelM: z.number().min(0).nullable().optional(),
    pumpSettingM: positive('pump setting').nullable().optional(),
    notes: notes.optional(),
  })
  .superRefine((w, ctx) => {
    if (w.staticLevelM != null && w.staticLevelM >= w.depthM)
      ctx.addIssue({
        code: 'custom',
        path: ['staticLevelM'],
        message: 'must be less than the well depth',
      });
    if (w.pumpSettingM != null && w.pumpSettingM >= w.depthM)
      ctx.addIssue({
        code: 'custom',
        path: ['pumpSettingM'],
        message: 'must be less than the well depth',
      });
  });

/** The equipment kinds kept as lists (path segment → table and body schemas). */
export const COLLECTIONS = {
  pumps: { table: 'pumps', create: pumpBody, patch: pumpBody.partial() },
  tanks: { table: 'tanks', create: tankBody, patch: tankPatch },
  'pv-arrays': { table: 'pv_arrays', create: pvArrayBody, patch: pvArrayBody.partial() },
  'float-switches': {
    table: 'float_switches',
    create: floatSwitchBody,
    patch: floatSwitchBody.partial(),
  },
} as const;
export type CollectionKind = keyof typeof COLLECTIONS;
export const collectionKind = z.enum(
  Object.keys(COLLECTIONS) as [CollectionKind, ...CollectionKind[]],
  {
    message: 'must be pumps, tanks, pv-arrays or float-switches',
  },
);
export const NOTE_KINDS = [
  'pumps',
  'tanks',
  'pv-arrays',
  'float-switches',
  'battery-bank',
  'well',
] as const;
export const noteKind = z.enum(NOTE_KINDS);

export const collectionParams = z.object({ siteId: uuid(), kind: collectionKind });
export const itemParams = z.object({ siteId: uuid(), kind: collectionKind, itemId: uuid() });
export const noteParams = z.object({ siteId: uuid(), kind: noteKind, itemId: uuid() });
export const notesBody = z.object({ notes });

const item = z.record(z.string(), z.unknown());
export const equipmentResponse = z.object({
  batteryBank: item.nullable(),
  well: item.nullable(),
  pumps: z.array(item),
  tanks: z.array(item),
  pvArrays: z.array(item),
  floatSwitches: z.array(item),
});

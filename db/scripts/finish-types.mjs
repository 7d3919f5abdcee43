// kysely-codegen writes the column types; this adds the shared AlertKind union they refer to.
import { readFileSync, writeFileSync } from 'node:fs';

const file = new URL('../src/schema.ts', import.meta.url);
const text = readFileSync(file, 'utf8');
const kinds = `export type AlertKind =\n  | 'low_charge'\n  | 'overnight_sag'\n  | 'float_stuck'\n  | 'dry_run'\n  | 'short_cycling'\n  | 'gateway_silent'\n  | 'water_low'\n  | 'no_charge';\n\n`;
const marker = 'export interface AlertEvents';
if (!text.includes('export type AlertKind')) {
  writeFileSync(file, text.replace(marker, kinds + marker));
}

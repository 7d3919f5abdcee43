import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The checkout's root folder (db/src or db/dist is two levels below it). */
export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

/** Git-ignored folder for everything the project writes at run time (database, uploads). */
export function dataRoot(): string {
  return resolve(process.env.WELLKEPT_DATA_DIR ?? resolve(repoRoot, '.data'));
}

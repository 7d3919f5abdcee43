/**
 * `npm run bench -w dashboard`: prints (never asserts)
 *  1. first-load JavaScript, gzip bytes, of the sign-in page and of the site page, from a
 *     production build (the entry chunk, the route's lazy chunks and everything they import
 *     statically), against the 200 KB target for sign-in;
 *  2. time to charts drawn on a site page showing 30 days of minute data, in headless
 *     Chromium: from navigation start, and from the last series response arriving (target
 *     ≤ 300 ms after data arrives).
 * Needs the API built (`npx tsc -b api`; the npm script does it).
 */
import { readFileSync } from 'node:fs';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { build } from 'vite';
import { ARTIFACTS, launchChromium } from '../test/support/browser.js';
import { startStack } from './stack.js';

const viteConfig = fileURLToPath(new URL('../vite.config.ts', import.meta.url));

interface ManifestChunk {
  file: string;
  src?: string;
  isEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
}
type Manifest = Record<string, ManifestChunk>;

/** A chunk and everything it imports statically (what the browser must load before running it). */
function closure(manifest: Manifest, keys: string[]): Set<string> {
  const seen = new Set<string>();
  const visit = (key: string) => {
    if (seen.has(key)) return;
    seen.add(key);
    for (const i of manifest[key]?.imports ?? []) visit(i);
  };
  keys.forEach(visit);
  return seen;
}

function gzipBytes(outDir: string, manifest: Manifest, keys: Set<string>): number {
  let total = 0;
  for (const k of keys)
    total += gzipSync(readFileSync(join(outDir, manifest[k]!.file)), { level: 9 }).length;
  return total;
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;

async function bundleSizes() {
  const outDir = mkdtempSync(join(tmpdir(), 'wk-bench-dist-'));
  await build({
    configFile: viteConfig,
    logLevel: 'warn',
    build: { outDir, manifest: true, sourcemap: false },
  });
  const manifest = JSON.parse(
    readFileSync(join(outDir, '.vite', 'manifest.json'), 'utf8'),
  ) as Manifest;
  const entry = Object.keys(manifest).find((k) => manifest[k]!.isEntry)!;
  const route = (name: string) =>
    Object.keys(manifest).find((k) => k.endsWith(`src/app/routes/${name}.tsx`))!;
  const signIn = gzipBytes(outDir, manifest, closure(manifest, [entry, route('sign-in')]));
  const site = gzipBytes(
    outDir,
    manifest,
    closure(manifest, [entry, route('app-shell'), route('site')]),
  );
  const all = gzipBytes(
    outDir,
    manifest,
    new Set(Object.keys(manifest).filter((k) => manifest[k]!.file.endsWith('.js'))),
  );
  console.log('first-load JavaScript (gzip, level 9):');
  console.log(
    `  sign-in page   ${kb(signIn).padStart(9)}   target ≤ 200 KB: ${signIn <= 200 * 1024 ? 'met' : 'NOT met'} (${((signIn / (200 * 1024)) * 100).toFixed(0)} % of it)`,
  );
  console.log(
    `  site page      ${kb(site).padStart(9)}   (${(site / signIn).toFixed(2)}× sign-in)`,
  );
  console.log(`  whole app      ${kb(all).padStart(9)}   (every chunk; pages load only theirs)`);
}

async function chartTiming() {
  const siteName = 'Juniper Bench Homestead';
  const started = Date.now();
  const stack = await startStack({
    days: 30,
    stepSeconds: 60,
    siteNames: [siteName],
    serve: 'preview',
  });
  console.log(
    `\n30 days of minute data for one site loaded in ${((Date.now() - started) / 1000).toFixed(0)} s`,
  );
  const browser = await launchChromium();
  try {
    const page = browser.context.pages()[0] ?? (await browser.context.newPage());
    page.on('pageerror', (e) => console.log(`page error: ${e.message}`));
    page.on('console', (m) => m.type() === 'error' && console.log(`console: ${m.text()}`));
    await page.goto(`${stack.dashboardUrl}/sign-in`);
    await page.getByLabel('E-mail').fill('admin@lanternfield.example');
    await page.getByLabel('Password').fill('demo-admin-pass');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Sites' }).waitFor();
    const siteId = await page
      .locator('li[data-site-id]', { hasText: siteName })
      .getAttribute('data-site-id');
    const runs: { drawn: number; afterData: number; points: string }[] = [];
    for (let i = 0; i < 5; i++) {
      await page.goto(`${stack.dashboardUrl}/sites/${siteId}?range=30d`);
      await page
        .waitForFunction(
          () => performance.getEntriesByName('wellkept:charts-drawn').length > 0,
          null,
          { timeout: 60_000 },
        )
        .catch(async (error: unknown) => {
          await page.screenshot({ path: join(ARTIFACTS, 'bench-timeout.png'), fullPage: true });
          throw error;
        });
      runs.push(
        await page.evaluate(() => {
          const drawn = performance.getEntriesByName('wellkept:charts-drawn')[0]!.startTime;
          const series = performance
            .getEntriesByType('resource')
            .filter((e) => e.name.includes('/series')) as PerformanceResourceTiming[];
          const lastData = Math.max(...series.map((e) => e.responseEnd));
          return {
            drawn,
            afterData: drawn - lastData,
            points: document.querySelector('[data-range-note]')?.textContent ?? '',
          };
        }),
      );
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    console.log(`site page, 30-day range, ${runs.length} loads in headless Chromium (median):`);
    console.log(
      `  navigation → every chart drawn     ${median(runs.map((r) => r.drawn)).toFixed(0)} ms`,
    );
    console.log(
      `  last series answer → charts drawn  ${median(runs.map((r) => r.afterData)).toFixed(0)} ms   target ≤ 300 ms`,
    );
    console.log(`  (${runs[0]!.points.trim()})`);
  } finally {
    await browser.close();
    await stack.stop();
  }
}

if (!process.argv.includes('--charts-only')) await bundleSizes();
await chartTiming();

import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

export const CHROMIUM = '/usr/bin/chromium';
/** Screenshots land in the git-ignored test-artifacts/ folder at the repository root. */
export const ARTIFACTS = join(import.meta.dirname, '..', '..', '..', 'test-artifacts', 'dashboard');

/**
 * Debian's Chromium driven by playwright-core, headless, with a fresh profile each time
 * (playwright never downloads a browser here).
 */
export async function launchChromium(
  options: { width?: number; height?: number; colorScheme?: 'light' | 'dark' } = {},
): Promise<{ context: BrowserContext; close(): Promise<void> }> {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`${CHROMIUM} is missing: install it with apt-get install -y chromium`);
  }
  mkdirSync(ARTIFACTS, { recursive: true });
  const profile = mkdtempSync(join(tmpdir(), 'wk-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: options.width ?? 1280, height: options.height ?? 860 },
    colorScheme: options.colorScheme ?? 'light',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    context,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

// @vitest-environment node
/**
 * The dashboard in Debian's Chromium against the real API and database: roles see the right
 * sites and controls, an alert is acknowledged, a photo is uploaded and its thumbnail shown,
 * units switch from gallons to litres, a live reading arrives without a reload, and an invited
 * person joins and later resets their password through the e-mailed links.
 */
import { useTestDatabase } from '@wellkept/db/testing';
import type { BrowserContext, Cookie, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ARTIFACTS, launchChromium } from '../support/browser.js';
import { loadIngestHarness } from '../support/ingest.js';
import { startTestStack, type TestStack } from '../support/test-stack.js';

const test = useTestDatabase('dashboard_browser');
let stack: TestStack;
let browser: { context: BrowserContext; close(): Promise<void> };

const ADMIN = { email: 'admin@lanternfield.example', password: 'demo-admin-pass' };
const TECH = { email: 'tech@lanternfield.example', password: 'demo-tech-pass' };
const OWNER = { email: 'owner@lanternfield.example', password: 'demo-owner-pass' };
const ALL_SITES = 8;

beforeAll(async () => {
  stack = await startTestStack(test.db, test.url);
  browser = await launchChromium();
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

/** Session cookies per person: each signs in through the form once, later tests reuse them. */
const sessions = new Map<string, Cookie[]>();

async function signedIn(who: { email: string; password: string }): Promise<Page> {
  await browser.context.clearCookies();
  const page = await browser.context.newPage();
  const saved = sessions.get(who.email);
  if (saved) {
    await browser.context.addCookies(saved);
    await page.goto(`${stack.url}/`);
  } else {
    await page.goto(`${stack.url}/sign-in`);
    await page.getByLabel('E-mail').fill(who.email);
    await page.getByLabel('Password').fill(who.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
  }
  await page.getByRole('heading', { name: 'Sites' }).waitFor();
  sessions.set(who.email, await browser.context.cookies());
  return page;
}

async function siteId(name: string): Promise<string> {
  const row = await test.db
    .selectFrom('sites')
    .select('id')
    .where('name', '=', name)
    .executeTakeFirstOrThrow();
  return row.id;
}

const shot = (page: Page, name: string) =>
  page.screenshot({ path: `${ARTIFACTS}/${name}.png`, fullPage: true });

describe('dashboard in Chromium', () => {
  it('sends a visitor without a session to sign-in and back where they were going', async () => {
    await browser.context.clearCookies();
    const page = await browser.context.newPage();
    await page.goto(`${stack.url}/alerts`);
    await page.waitForURL(/\/sign-in\?next=%2Falerts/);
    await shot(page, 'sign-in');
    await page.getByLabel('E-mail').fill(ADMIN.email);
    await page.getByLabel('Password').fill('not the password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByRole('alert').textContent()).resolves.toMatch(/./);
    await page.getByLabel('Password').fill(ADMIN.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Alerts' }).waitFor();
    // Signing out ends the session: the next screen asks for sign-in again.
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(/\/sign-in/);
    await page.goto(`${stack.url}/account`);
    await page.waitForURL(/\/sign-in\?next=%2Faccount/);
    await page.close();
  });

  it('shows an admin every site, worst first, with the team page and configuration', async () => {
    const page = await signedIn(ADMIN);
    const rows = page.locator('ul[aria-label="Sites"] > li');
    await expect.poll(() => rows.count()).toBe(ALL_SITES);
    // The site with the open "act" alert comes first, marked by word and shape.
    await expect(rows.first().textContent()).resolves.toContain('Juniper Bench Homestead');
    await expect(rows.first().locator('[data-health="act"]').textContent()).resolves.toContain(
      'Act now',
    );
    await expect(page.getByRole('link', { name: 'Team' }).count()).resolves.toBe(1);
    // Wide screens get one row of column headings, each over its column's cells.
    const headings = page.getByTestId('board-headings');
    await expect(headings.isVisible()).resolves.toBe(true);
    for (const name of ['Charge', 'Water stored', 'Days of water', 'Last seen']) {
      const heading = await headings.getByText(name, { exact: true }).boundingBox();
      const cell = await rows
        .first()
        .getByText(name, { exact: true })
        .locator('xpath=..')
        .boundingBox();
      expect(Math.abs(heading!.x - cell!.x), name).toBeLessThanOrEqual(1);
    }
    await shot(page, 'board-admin');

    await page.goto(`${stack.url}/sites/${await siteId('Juniper Bench Homestead')}`);
    await page.locator('figure[data-chart="Battery"][data-drawn="yes"]').waitFor();
    await shot(page, 'site-admin');
    // Range presets and drag-to-zoom ask the API again, which picks the resolution.
    const note = page.locator('[data-range-note]');
    const asked: { from: number; to: number }[] = [];
    page.on('request', (r) => {
      const url = new URL(r.url());
      if (!url.pathname.endsWith('/series')) return;
      asked.push({
        from: Date.parse(url.searchParams.get('from') ?? ''),
        to: Date.parse(url.searchParams.get('to') ?? ''),
      });
    });
    await page.getByRole('button', { name: '30 d' }).click();
    await expect.poll(() => note.textContent()).toMatch(/the last 30 days · one point per \d+ h/);
    await page.getByRole('button', { name: '24 h' }).click();
    await expect.poll(() => note.textContent()).toMatch(/the last 24 hours · one point per/);
    const plot = page.locator('figure[data-chart="Battery"] .u-over');
    await plot.waitFor();
    const box = await plot.boundingBox();
    if (!box) throw new Error('the battery chart has no plot area');
    await page.mouse.move(box.x + box.width * 0.3, box.y + box.height / 2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2, { steps: 5 });
    await page.mouse.up();
    await expect.poll(() => note.textContent()).not.toMatch(/the last/);
    const zoomed = asked[asked.length - 1]!;
    expect(zoomed.to - zoomed.from).toBeGreaterThan(3 * 3600_000);
    expect(zoomed.to - zoomed.from).toBeLessThan(12 * 3600_000);
    await page.getByRole('button', { name: 'Show earlier' }).click();
    await expect.poll(() => asked[asked.length - 1]!.to).toBeLessThan(zoomed.to);
    await page.getByRole('link', { name: 'Run log' }).click();
    await page
      .getByText(/Totals per day|No pump runs/)
      .first()
      .waitFor();
    await shot(page, 'run-log-empty');
    await page.getByRole('link', { name: 'Equipment and thresholds' }).click();
    await page.getByText('Change the battery bank').waitFor();
    await page
      .getByRole('form', { name: 'Running dry' })
      .getByText(/default/)
      .first()
      .waitFor();
    await shot(page, 'equipment-admin');
    await page.getByRole('link', { name: 'Gateways' }).click();
    const add = page.getByRole('form', { name: 'Add a gateway' });
    await add.getByLabel('Gateway id').fill('juniper-spare-gw');
    await add.getByRole('button', { name: 'Add gateway' }).click();
    // The secret is shown once, with what a gateway needs to connect.
    const issued = page.getByRole('alert').filter({ hasText: 'juniper-spare-gw is ready' });
    await issued.waitFor();
    const secret = (await issued.locator('[data-field="Password (secret)"]').textContent()) ?? '';
    expect(secret.length).toBeGreaterThanOrEqual(20);
    await expect(issued.locator('[data-field="Client id"]').textContent()).resolves.toBe(
      'juniper-spare-gw',
    );
    await expect(issued.locator('[data-field="Publish to"]').textContent()).resolves.toContain(
      'juniper-spare-gw',
    );
    await expect(issued.getByRole('button', { name: 'Copy secret' }).count()).resolves.toBe(1);
    await shot(page, 'gateways-admin');
    await issued.getByRole('button', { name: 'I have stored it' }).click();
    await page.locator('li', { hasText: 'juniper-spare-gw' }).waitFor();
    expect(await page.locator('main').textContent()).not.toContain(secret);
    await page.getByRole('link', { name: 'Team' }).click();
    await page.getByRole('heading', { name: 'Team' }).waitFor();
    await page.getByText('tech@lanternfield.example').first().waitFor();
    await shot(page, 'team-admin');
    await page.close();
  });

  it('shows a technician every site but no team page and no configuration forms', async () => {
    const page = await signedIn(TECH);
    await expect.poll(() => page.locator('ul[aria-label="Sites"] > li').count()).toBe(ALL_SITES);
    await expect(page.getByRole('link', { name: 'Team' }).count()).resolves.toBe(0);
    await page.goto(`${stack.url}/sites/${await siteId('Juniper Bench Homestead')}/equipment`);
    await page.getByRole('heading', { name: 'Battery bank' }).waitFor();
    await expect(page.getByText('Change the battery bank').count()).resolves.toBe(0);
    await page.getByRole('link', { name: 'Gateways' }).click();
    await page
      .getByText(/no gateway yet|connected|not connected/i)
      .first()
      .waitFor();
    await expect(page.getByRole('form', { name: 'Add a gateway' }).count()).resolves.toBe(0);
    await page.close();
  });

  it('shows an owner only their own sites, in plain terms, without configuration', async () => {
    const page = await signedIn(OWNER);
    const rows = page.locator('ul[aria-label="Sites"] > li');
    await expect.poll(() => rows.count()).toBe(2);
    const names = (await rows.allTextContents()).join(' ');
    expect(names).toContain('Juniper Bench Homestead');
    expect(names).toContain('Owl Creek Cabin');
    expect(names).not.toContain('Red Mesa Ranch');
    await page.goto(`${stack.url}/sites/${await siteId('Owl Creek Cabin')}`);
    await page.getByRole('heading', { name: 'Water in storage' }).waitFor();
    await page.getByText('Your installer has been told about this.').first().waitFor();
    await expect(
      page.getByRole('link', { name: 'Equipment and thresholds' }).count(),
    ).resolves.toBe(0);
    // Once on the page (in the summary), not again beside each alert.
    await expect(page.getByText(/leave enclosures and battery boxes closed/).count()).resolves.toBe(
      1,
    );
    await shot(page, 'site-owner');
    // Owners use phones: the same page at phone width, in the dark theme the device asks for.
    await page.setViewportSize({ width: 390, height: 844 });
    await page.emulateMedia({ colorScheme: 'dark' });
    await expect
      .poll(() => page.evaluate(() => document.documentElement.classList.contains('dark')))
      .toBe(true);
    // Nothing wider than the phone: list what sticks out, if anything.
    const tooWide = await page.evaluate(() =>
      [...document.querySelectorAll('body *')]
        .filter((el) => el.getBoundingClientRect().right > window.innerWidth + 1)
        .filter((el) => !el.closest('[data-scrolls]'))
        .slice(0, 5)
        .map(
          (el) => `${el.tagName.toLowerCase()}.${el.className} ${el.getBoundingClientRect().right}`,
        ),
    );
    expect(tooWide).toEqual([]);
    await shot(page, 'site-owner-phone-dark');
    await page.setViewportSize({ width: 1280, height: 860 });
    await page.emulateMedia({ colorScheme: 'light' });
    // A site the owner is not linked to is not found.
    await page.goto(`${stack.url}/sites/${await siteId('Red Mesa Ranch')}`);
    await page.getByText('This site could not be opened.').waitFor();
    await page.close();
  });

  it('lets a technician acknowledge an alert with a note', async () => {
    const page = await signedIn(TECH);
    await page.getByRole('link', { name: 'Alerts' }).click();
    const item = page.locator('li[data-status="open"]', { hasText: 'Running dry' });
    await item.getByRole('button', { name: 'Acknowledge' }).click();
    await item.getByLabel(/Note for the team/).fill('Driving out Thursday with a spare pump');
    await item.getByRole('button', { name: 'Acknowledge' }).click();
    await page
      .locator('li[data-status="acknowledged"]', { hasText: 'Driving out Thursday' })
      .waitFor();
    await shot(page, 'alerts-technician');
    const row = await test.db
      .selectFrom('alerts')
      .select(['status', 'acknowledge_note'])
      .where('kind', '=', 'dry_run')
      .executeTakeFirstOrThrow();
    expect(row).toEqual({
      status: 'acknowledged',
      acknowledge_note: 'Driving out Thursday with a spare pump',
    });
    await page.close();
  });

  it('records a visit, uploads a photo and shows its thumbnail', { timeout: 60_000 }, async () => {
    const page = await signedIn(TECH);
    await page.goto(`${stack.url}/sites/${await siteId('Owl Creek Cabin')}/visits`);
    await page.getByLabel('Summary').fill('Checked the float switch');
    await page.getByRole('button', { name: 'Save visit' }).click();
    const visit = page.locator('li[data-visit-id]', { hasText: 'Checked the float switch' });
    await visit.waitFor();
    // A real photo-sized PNG: Chromium's own screenshot of the page.
    const png = await page.screenshot({ clip: { x: 0, y: 0, width: 640, height: 480 } });
    await visit
      .locator('input[type="file"]')
      .setInputFiles({ name: 'float.png', mimeType: 'image/png', buffer: png });
    const thumb = visit.getByRole('img', { name: 'Photo: float.png' });
    await thumb.waitFor({ timeout: 15_000 }).catch(async (error: unknown) => {
      await shot(page, 'visits-upload-failed');
      throw new Error(`no thumbnail; the visit shows: ${await visit.textContent()}`, {
        cause: error,
      });
    });
    await expect
      .poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth))
      .toBeGreaterThan(0);
    await shot(page, 'visits-technician');
    await page.close();
  });

  it('shows gallons, then litres after the person switches to metric', async () => {
    const page = await signedIn(ADMIN);
    const firstRow = page.locator('ul[aria-label="Sites"] > li').first();
    await expect(firstRow.textContent()).resolves.toMatch(/gal/);
    await page.getByRole('link', { name: 'Account' }).click();
    await shot(page, 'account');
    await page.getByRole('radio', { name: /Metric/ }).check();
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('Saved.').first().waitFor();
    await page.getByRole('link', { name: 'Sites', exact: true }).click();
    await expect.poll(() => firstRow.textContent()).toMatch(/\dL/);
    expect(await firstRow.textContent()).not.toMatch(/gal/);
    await shot(page, 'board-metric');
    // Back to US customary for the other tests.
    await page.getByRole('link', { name: 'Account' }).click();
    await page.getByRole('radio', { name: /US customary/ }).check();
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('Saved.').first().waitFor();
    await page.close();
  });

  it(
    'draws a new reading without a reload when the site reports through ingest',
    { timeout: 90_000 },
    async () => {
      const id = await siteId('Owl Creek Cabin');
      const credentials = stack.seed.gateways.find((g) => g.siteId === id);
      if (!credentials) throw new Error('the demo seed made no gateway for Owl Creek Cabin');
      // The real ingest service (embedded broker, checks, durable write, NOTIFY) on free ports.
      const { startTestIngest, connectGateway, publishAcked, baseName } = await loadIngestHarness();
      const ingest = await startTestIngest(test.url, { lastSeenIntervalMs: 200 });
      const gateway = await connectGateway(ingest.mqttUrl, credentials);
      try {
        const page = await signedIn(ADMIN);
        await page.goto(`${stack.url}/sites/${id}`);
        await page.getByText('Live', { exact: true }).waitFor();
        const stored = page
          .locator('dl')
          .getByText(/Water stored/)
          .locator('..');
        const before = await stored.textContent();
        // A mark on this document: a reload would lose it.
        await page.evaluate(() => Object.assign(window, { wkSameDocument: true }));
        const level = await test.db
          .selectFrom('channels')
          .select(['last_value'])
          .where('site_id', '=', id)
          .where('name', '=', 'tank/storage/level')
          .executeTakeFirstOrThrow();
        const newLevel = Math.max(0.3, (level.last_value ?? 1.5) - 0.35);
        // A gateway reports every few seconds; keep reporting until the page shows it.
        const report = () =>
          publishAcked(
            gateway,
            `gateways/${credentials.gatewayId}/senml`,
            JSON.stringify([
              {
                bn: baseName(credentials.gatewayId),
                bt: Math.floor(Date.now() / 1000),
                n: 'tank/storage/level',
                u: 'm',
                v: newLevel,
              },
            ]),
          );
        await report();
        const timer = setInterval(() => void report().catch(() => undefined), 2_000);
        try {
          await expect.poll(() => stored.textContent(), { timeout: 20_000 }).not.toBe(before);
        } finally {
          clearInterval(timer);
        }
        // No reload happened: the same document is still showing.
        await expect(page.evaluate(() => 'wkSameDocument' in window)).resolves.toBe(true);
        await shot(page, 'site-live');

        // A record ingest refuses shows on the gateway with its reason.
        await report();
        await publishAcked(
          gateway,
          `gateways/${credentials.gatewayId}/senml`,
          JSON.stringify([
            {
              bn: baseName(credentials.gatewayId),
              bt: Math.floor(Date.now() / 1000),
              n: 'battery/voltage',
              u: 'V',
              v: 912,
            },
          ]),
        );
        await page.getByRole('link', { name: 'Gateways' }).click();
        const item = page.locator('li', { hasText: credentials.gatewayId });
        await item.getByRole('button', { name: 'Recent rejects' }).click();
        await item.getByText(/battery\/voltage: value 912 V outside/).waitFor();
        await shot(page, 'gateway-rejects');

        // Ingest's roll-up turns the simulated switch states into pump runs: the run log lists
        // them with totals per day.
        await ingest.sweep();
        await page.getByRole('link', { name: 'Run log' }).click();
        await page.getByRole('heading', { name: 'Totals per day' }).waitFor();
        await expect(
          page.locator('table').first().locator('tbody tr').count(),
        ).resolves.toBeGreaterThan(0);
        await shot(page, 'run-log');
        await page.close();
      } finally {
        gateway.end(true);
        await ingest.close();
      }
    },
  );
  it('lets an invited technician join through the e-mailed link, once, and reset the password later', async () => {
    const email = 'nell.harrow@lanternfield.example';
    const admin = await signedIn(ADMIN);
    await admin.goto(`${stack.url}/team`);
    const form = admin.getByRole('form', { name: 'Invite someone' });
    await form.getByLabel('E-mail').fill(email);
    await form.getByLabel('Role').selectOption('technician');
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await form.getByText(`Invitation sent to ${email}.`).waitFor();
    await admin.close();
    const invitation = await stack.mail.waitFor((m) => m.to.includes(email), 20_000);
    const token = /accept-invitation\?token=([\w-]+)/.exec(invitation.text)?.[1];
    expect(token, invitation.text).toBeTruthy();

    // The link, opened signed out, sets a password and signs the person in.
    await browser.context.clearCookies();
    const page = await browser.context.newPage();
    await page.goto(`${stack.url}/accept-invitation?token=${token}`);
    await page.getByLabel('Your name').fill('Nell Harrow');
    await page.getByLabel('Choose a password').fill('first-password-for-nell');
    await page.getByLabel('Type it again').fill('first-password-for-nell');
    await page.getByRole('button', { name: 'Accept and sign in' }).click();
    await page.getByRole('heading', { name: 'Sites' }).waitFor();
    await expect.poll(() => page.locator('ul[aria-label="Sites"] > li').count()).toBe(ALL_SITES);
    await shot(page, 'accepted-invitation');

    // It works once.
    await browser.context.clearCookies();
    await page.goto(`${stack.url}/accept-invitation?token=${token}`);
    await page
      .getByText('This invitation was already used or has expired. Ask for a new one.')
      .waitFor();

    // Forgot the password: the reset link sets a new one, and only the new one signs in.
    await page.goto(`${stack.url}/sign-in`);
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.getByLabel('E-mail').fill(email);
    await page.getByRole('button', { name: 'Send me a link' }).click();
    await page.getByText(/a link to set a new password is on its way/).waitFor();
    const reset = await stack.mail.waitFor(
      (m) => m.to.includes(email) && /reset-password\?token=/.test(m.text),
      20_000,
    );
    const resetToken = /reset-password\?token=([\w-]+)/.exec(reset.text)?.[1];
    expect(resetToken, reset.text).toBeTruthy();
    await page.goto(`${stack.url}/reset-password?token=${resetToken}`);
    // By name: a label search for "New password" also finds the form titled "Set a new password".
    await page.locator('input[name="password"]').fill('second-password-for-nell');
    await page.locator('input[name="again"]').fill('second-password-for-nell');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText(/Your password is changed/).waitFor();

    const signInWith = async (password: string) => {
      await page.goto(`${stack.url}/sign-in`);
      await page.getByLabel('E-mail').fill(email);
      await page.getByLabel('Password').fill(password);
      await page.getByRole('button', { name: 'Sign in' }).click();
    };
    await signInWith('first-password-for-nell');
    await page.getByRole('alert').waitFor();
    await expect(page.getByRole('heading', { name: 'Sites' }).count()).resolves.toBe(0);
    await signInWith('second-password-for-nell');
    await page.getByRole('heading', { name: 'Sites' }).waitFor();
    await page.close();
  });
});

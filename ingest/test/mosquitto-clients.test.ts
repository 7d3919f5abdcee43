import { execFile } from 'node:child_process';
import { existsSync } from 'node:fs';
import { promisify } from 'node:util';
import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseName,
  readingsOf,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from './support/ingest-harness.js';

const run = promisify(execFile);
const MOSQUITTO_PUB = '/usr/bin/mosquitto_pub';

const database = useTestDatabase('ingest_mosquitto');
let ingest: RunningIngest;
let site: SeededSite;

beforeAll(async () => {
  if (!existsSync(MOSQUITTO_PUB)) {
    throw new Error(
      'mosquitto_pub is missing: install Debian\'s "mosquitto-clients" (npm test does this)',
    );
  }
  ingest = await startTestIngest(database.url);
  site = await seedSite(database.db);
});

afterAll(async () => {
  await ingest?.close();
});

/** Publishes one message at QoS 1 with Debian's mosquitto_pub; it exits once acknowledged. */
function mosquittoPub(topic: string, message: string) {
  return run(
    MOSQUITTO_PUB,
    [
      '-h',
      '127.0.0.1',
      '-p',
      new URL(ingest.mqttUrl).port,
      '-V',
      'mqttv311',
      '-q',
      '1',
      '-c', // clean session off, as the contract recommends
      '-i',
      site.gatewayId,
      '-u',
      site.gatewayId,
      '-P',
      site.secret,
      '-t',
      topic,
      '-m',
      message,
    ],
    { timeout: 15_000 },
  );
}

describe('a client the project did not write (mosquitto_pub)', () => {
  it('publishes a valid pack that is stored', async () => {
    const t = Math.floor(Date.now() / 1000) - 5;
    const pack = [
      { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 25.7 },
      { n: 'float/main-high/closed', vb: false },
      { n: 'pressure/house', u: 'Pa', v: 275_000 },
    ];
    await mosquittoPub(`gateways/${site.gatewayId}/senml`, JSON.stringify(pack));
    const rows = await readingsOf(database.db, site.siteId);
    expect(rows.map((r) => [r.name, r.value, r.time.getTime()])).toEqual([
      ['battery/voltage', 25.7, t * 1000],
      ['float/main-high/closed', 0, t * 1000],
      ['pressure/house', 275_000, t * 1000],
    ]);
  });

  it('publishes a malformed pack that is rejected with a reason', async () => {
    await mosquittoPub(`gateways/${site.gatewayId}/senml`, '[{"n": "battery/voltage", "v": 25.1,]');
    const rejects = await database.db
      .selectFrom('ingest_rejects')
      .select(['reason', 'raw', 'site_id'])
      .where('gateway_id', '=', site.gatewayId)
      .execute();
    expect(rejects).toEqual([
      {
        reason: expect.stringMatching(/not valid JSON/),
        raw: '[{"n": "battery/voltage", "v": 25.1,]',
        site_id: site.siteId,
      },
    ]);
    expect(await readingsOf(database.db, site.siteId)).toHaveLength(3);
  });
});

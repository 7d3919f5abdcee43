import { sql } from 'kysely';
import { beforeAll, describe, expect, it } from 'vitest';
import { ensureTimePartitions } from '../src/partitions.js';
import { useTestDatabase } from '../src/testing.js';

const test = useTestDatabase('cons');
let companyId = '';
let siteId = '';

const site = (over: Record<string, unknown> = {}) => ({
  company_id: companyId,
  name: `Site ${Math.random()}`,
  latitude: 35.1,
  longitude: -106.6,
  time_zone: 'America/Denver',
  ...over,
});

beforeAll(async () => {
  const company = await test.db
    .insertInto('companies')
    .values({ name: 'Test Water Co' })
    .returning('id')
    .executeTakeFirstOrThrow();
  companyId = company.id;
  const s = await test.db
    .insertInto('sites')
    .values(site())
    .returning('id')
    .executeTakeFirstOrThrow();
  siteId = s.id;
});

describe('constraints reject bad rows', () => {
  it('a latitude of 95 degrees', async () => {
    await expect(
      test.db
        .insertInto('sites')
        .values(site({ latitude: 95 }))
        .execute(),
    ).rejects.toThrow(/sites_latitude_check/);
  });

  it('a longitude of -181 degrees', async () => {
    await expect(
      test.db
        .insertInto('sites')
        .values(site({ longitude: -181 }))
        .execute(),
    ).rejects.toThrow(/sites_longitude_check/);
  });

  it('an unknown time zone', async () => {
    await expect(
      test.db
        .insertInto('sites')
        .values(site({ time_zone: 'Mars/Olympus_Mons' }))
        .execute(),
    ).rejects.toThrow(/sites_time_zone_check/);
  });

  it('a time zone abbreviation or a POSIX rule that is not a zone name', async () => {
    for (const tz of ['PDT', 'UTC+3', 'XYZ3ABC,M3.2.0,M11.1.0', '', 'America/']) {
      await expect(
        test.db
          .insertInto('sites')
          .values(site({ time_zone: tz }))
          .execute(),
        tz,
      ).rejects.toThrow(/sites_time_zone_check/);
    }
  });

  it('the time zone check agrees with every name the server knows', async () => {
    // The check avoids scanning pg_timezone_names for zone names with a slash (see the 1100
    // migration); it must still accept all of them. Names without one take the full lookup.
    const { rows } = await sql<{ refused: string[] }>`
      select coalesce(array_agg(name), '{}') as refused
      from pg_timezone_names
      where (position('/' in name) > 0 or name in ('UTC', 'GMT', 'EST5EDT'))
        and not is_valid_time_zone(name)`.execute(test.db);
    expect(rows[0]!.refused).toEqual([]);
  });

  it('accepts a real IANA zone in the southern hemisphere', async () => {
    const row = await test.db
      .insertInto('sites')
      .values(site({ latitude: -31.9, longitude: 115.9, time_zone: 'Australia/Perth' }))
      .returning('time_zone')
      .executeTakeFirstOrThrow();
    expect(row.time_zone).toBe('Australia/Perth');
  });

  it('a battery bank with negative capacity', async () => {
    await expect(
      test.db
        .insertInto('battery_banks')
        .values({ site_id: siteId, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: -100 })
        .execute(),
    ).rejects.toThrow(/battery_banks_capacity_ah_check/);
  });

  it('a battery bank with an odd nominal voltage or unknown chemistry', async () => {
    await expect(
      test.db
        .insertInto('battery_banks')
        .values({ site_id: siteId, chemistry: 'agm', nominal_voltage_v: 17, capacity_ah: 100 })
        .execute(),
    ).rejects.toThrow(/nominal_voltage_v_check/);
    await expect(
      test.db
        .insertInto('battery_banks')
        // @ts-expect-error: the type forbids it too; the database must refuse it on its own
        .values({
          site_id: siteId,
          chemistry: 'nickel-iron',
          nominal_voltage_v: 24,
          capacity_ah: 100,
        })
        .execute(),
    ).rejects.toThrow(/chemistry_check/);
  });

  it('a storage tank without the dimensions its geometry needs', async () => {
    await expect(
      test.db
        .insertInto('tanks')
        .values({
          site_id: siteId,
          key: 'cistern',
          name: 'Cistern',
          kind: 'storage',
          geometry: 'horizontal_cylinder',
          diameter_m: 1.2,
        })
        .execute(),
    ).rejects.toThrow(/tanks_check/);
  });

  it('a pressure tank whose cut-out is below its cut-in', async () => {
    await expect(
      test.db
        .insertInto('tanks')
        .values({
          site_id: siteId,
          key: 'bladder',
          name: 'Bladder tank',
          kind: 'pressure',
          capacity_m3: 0.08,
          precharge_pa: 190000,
          cut_in_pa: 344738,
          cut_out_pa: 206843,
        })
        .execute(),
    ).rejects.toThrow(/tanks_check/);
  });

  it('a pump setting below the bottom of the well', async () => {
    await expect(
      test.db
        .insertInto('wells')
        .values({ site_id: siteId, depth_m: 60, casing_diameter_m: 0.1016, pump_setting_m: 75 })
        .execute(),
    ).rejects.toThrow(/wells_check/);
  });

  it('two users with the same e-mail in different case', async () => {
    await test.db
      .insertInto('users')
      .values({ company_id: companyId, email: 'Pat@Example.test', name: 'Pat', role: 'owner' })
      .execute();
    await expect(
      test.db
        .insertInto('users')
        .values({ company_id: companyId, email: 'pat@example.test', name: 'Pat 2', role: 'owner' })
        .execute(),
    ).rejects.toThrow(/users_email_key/);
  });

  it('a second open alert of the same kind for the same site and equipment', async () => {
    const open = {
      site_id: siteId,
      kind: 'dry_run' as const,
      subject: 'well',
      severity: 'act' as const,
      status: 'open' as const,
    };
    await test.db.insertInto('alerts').values(open).execute();
    await expect(test.db.insertInto('alerts').values(open).execute()).rejects.toThrow(
      /alerts_one_open_idx/,
    );
    // A cleared one does not count: history may hold many.
    await test.db
      .insertInto('alerts')
      .values({ ...open, status: 'cleared' })
      .execute();
  });
});

describe('time partitions', () => {
  it('readings across a month boundary land in daily partitions and read back', async () => {
    const from = new Date('2026-01-31T00:00:00Z');
    const to = new Date('2026-02-02T00:00:00Z');
    expect(await ensureTimePartitions(test.db, 'readings', from, to)).toBe(2);
    expect(await ensureTimePartitions(test.db, 'readings', from, to)).toBe(0);
    const channel = await test.db
      .insertInto('channels')
      .values({ site_id: siteId, name: 'battery/voltage', unit: 'V', value_kind: 'number' })
      .returning('id')
      .executeTakeFirstOrThrow();
    const times = ['2026-01-31T23:59:30Z', '2026-02-01T00:00:00Z', '2026-02-01T00:00:30Z'];
    await test.db
      .insertInto('readings')
      .values(
        times.map((t, i) => ({
          site_id: siteId,
          channel_id: channel.id,
          time: new Date(t),
          value: 25 + i / 10,
        })),
      )
      .execute();
    const rows = await test.db
      .selectFrom('readings')
      .select(['time', 'value'])
      .where('channel_id', '=', channel.id)
      .orderBy('time')
      .execute();
    expect(rows.map((r) => r.time.toISOString())).toEqual(
      times.map((t) => new Date(t).toISOString()),
    );
    await expect(
      test.db
        .insertInto('readings')
        .values({
          site_id: siteId,
          channel_id: channel.id,
          time: new Date('2026-03-05T00:00:00Z'),
          value: 1,
        })
        .execute(),
    ).rejects.toThrow(/no partition/);
  });
});

describe('gateway secrets', async () => {
  const { newGatewaySecret, hashGatewaySecret, verifyGatewaySecret } =
    await import('../src/gateway-secrets.js');
  it('verify only the secret that was hashed, and never store it in the clear', () => {
    const secret = newGatewaySecret();
    const stored = hashGatewaySecret(secret);
    expect(stored).not.toContain(secret);
    expect(verifyGatewaySecret(secret, stored)).toBe(true);
    expect(verifyGatewaySecret(`${secret}x`, stored)).toBe(false);
    expect(verifyGatewaySecret(secret, 'sha256:short')).toBe(false);
    expect(newGatewaySecret()).not.toBe(secret);
  });
});

import { randomUUID } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { type Database, hashGatewaySecret } from '@wellkept/db';
import sharp from 'sharp';
import { hashOpaqueToken } from '../../src/auth/opaque-tokens.js';
import { createChannel, insertRawReadings } from '../support/telemetry.js';
import { createCompany, createSite, createUser } from '../support/fixtures.js';

export type SiteKey = 'linked' | 'unlinked' | 'other';

/** One site with one of everything, so every site route has something to act on. */
export interface SiteWorld {
  key: SiteKey;
  siteId: string;
  pumpId: string;
  gatewayId: string;
  alertId: string;
  visitId: string;
  attachmentId: string;
}

let n = 0;
export const unique = (prefix: string) =>
  `${prefix}${Date.now().toString(36)}${(n++).toString(36)}`;

/**
 * Two tenants: company A with an admin, a technician and an owner linked to one of its two
 * sites; company B with its own site and people. Helpers make fresh rows for routes that use
 * them up (delete, revoke, acknowledge, accept).
 */
export class World {
  a!: {
    companyId: string;
    admin: string;
    technician: string;
    owner: string;
    ownerId: string;
    colleague: string;
    colleagueEmail: string;
  };
  b!: { companyId: string; admin: string; userId: string };
  sites!: Record<SiteKey, SiteWorld>;
  png!: Buffer;

  constructor(
    private readonly db: Database,
    private readonly uploadsDir: string,
  ) {}

  async build(): Promise<void> {
    this.png = await sharp({ create: { width: 16, height: 12, channels: 3, background: '#3a7' } })
      .png()
      .toBuffer();
    const a = await createCompany(this.db);
    const b = await createCompany(this.db);
    const linked = await this.site(a, 'linked');
    const unlinked = await this.site(a, 'unlinked');
    const other = await this.site(b, 'other');
    const admin = await createUser(this.db, a, 'admin');
    const technician = await createUser(this.db, a, 'technician');
    const owner = await createUser(this.db, a, 'owner', { siteIds: [linked.siteId] });
    const colleague = await createUser(this.db, a, 'technician');
    const bAdmin = await createUser(this.db, b, 'admin');
    const bUser = await createUser(this.db, b, 'technician');
    this.a = {
      companyId: a,
      admin: admin.email,
      technician: technician.email,
      owner: owner.email,
      ownerId: owner.id,
      colleague: colleague.id,
      colleagueEmail: colleague.email,
    };
    this.b = { companyId: b, admin: bAdmin.email, userId: bUser.id };
    this.sites = { linked, unlinked, other };
  }

  companyOf(key: SiteKey): string {
    return key === 'other' ? this.b.companyId : this.a.companyId;
  }

  private async site(companyId: string, key: SiteKey): Promise<SiteWorld> {
    // The owner's link to the 'linked' site is made in build(), once the owner exists.
    const siteId = await createSite(this.db, companyId);
    const voltage = await createChannel(this.db, siteId, 'battery/voltage', 'V');
    await insertRawReadings(this.db, siteId, voltage, new Date(Date.now() - 3600_000), 60, 60);
    const pumpId = await this.freshPump(siteId);
    const gatewayId = await this.freshGateway(siteId);
    const alertId = await this.freshAlert(siteId);
    const visitId = await this.freshVisit(siteId);
    const attachmentId = await this.freshAttachment(siteId, visitId);
    await this.db
      .insertInto('pump_runs')
      .values({
        site_id: siteId,
        pump_id: pumpId,
        started_at: new Date(Date.now() - 1800_000),
        ended_at: new Date(Date.now() - 1500_000),
        duration_s: 300,
        energy_wh: 40,
      })
      .execute();
    return { key, siteId, pumpId, gatewayId, alertId, visitId, attachmentId };
  }

  /** A new site in the same relation to the caller as `key` (for deleting sites). */
  async freshSite(key: SiteKey): Promise<string> {
    const siteId = await createSite(this.db, this.companyOf(key));
    if (key === 'linked')
      await this.db
        .insertInto('owner_sites')
        .values({ user_id: this.a.ownerId, site_id: siteId })
        .execute();
    return siteId;
  }

  async ensureBattery(siteId: string): Promise<void> {
    await this.db
      .insertInto('battery_banks')
      .values({ site_id: siteId, chemistry: 'flooded', nominal_voltage_v: 24, capacity_ah: 200 })
      .onConflict((oc) => oc.column('site_id').doNothing())
      .execute();
  }

  async ensureWell(siteId: string): Promise<void> {
    await this.db
      .insertInto('wells')
      .values({ site_id: siteId, depth_m: 80, casing_diameter_m: 0.1 })
      .onConflict((oc) => oc.column('site_id').doNothing())
      .execute();
  }

  async freshPump(siteId: string): Promise<string> {
    const row = await this.db
      .insertInto('pumps')
      .values({
        site_id: siteId,
        key: unique('p'),
        name: 'Well pump',
        kind: 'well',
        supply: 'pv_direct',
        rated_current_a: 6,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return row.id;
  }

  async freshGateway(siteId: string): Promise<string> {
    const id = unique('gw-');
    await this.db
      .insertInto('gateways')
      .values({ id, site_id: siteId, secret_hash: hashGatewaySecret('x') })
      .execute();
    return id;
  }

  async freshAlert(siteId: string): Promise<string> {
    const row = await this.db
      .insertInto('alerts')
      .values({
        site_id: siteId,
        kind: 'low_charge',
        subject: unique('s'),
        severity: 'watch',
        status: 'open',
        summary: 'Battery low',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await this.db
      .insertInto('alert_events')
      .values({ alert_id: row.id, site_id: siteId, event: 'opened' })
      .execute();
    return row.id;
  }

  async freshVisit(siteId: string): Promise<string> {
    const row = await this.db
      .insertInto('service_visits')
      .values({ site_id: siteId, visited_at: new Date(), summary: 'Checked the float switch' })
      .returning('id')
      .executeTakeFirstOrThrow();
    return row.id;
  }

  async freshAttachment(siteId: string, visitId: string): Promise<string> {
    const id = randomUUID();
    mkdirSync(join(this.uploadsDir, siteId), { recursive: true });
    writeFileSync(join(this.uploadsDir, siteId, `${id}.png`), this.png);
    writeFileSync(
      join(this.uploadsDir, siteId, `${id}.thumb.webp`),
      await sharp(this.png).webp().toBuffer(),
    );
    await this.db
      .insertInto('attachments')
      .values({
        id,
        visit_id: visitId,
        site_id: siteId,
        file_name: 'photo.png',
        content_type: 'image/png',
        size_bytes: this.png.length,
        sha256: 'x',
        storage_key: `${siteId}/${id}.png`,
        thumbnail_key: `${siteId}/${id}.thumb.webp`,
      })
      .execute();
    return id;
  }

  async freshUser(tenant: 'own' | 'other'): Promise<string> {
    return (
      await createUser(
        this.db,
        tenant === 'own' ? this.a.companyId : this.b.companyId,
        'technician',
      )
    ).id;
  }

  /** An invitation whose link token is known (only its hash is stored). */
  async freshInvitation(tenant: 'own' | 'other'): Promise<{ id: string; token: string }> {
    const token = unique('invitation-token-0123456789-');
    const row = await this.db
      .insertInto('invitations')
      .values({
        company_id: tenant === 'own' ? this.a.companyId : this.b.companyId,
        email: `${unique('invitee')}@people.example`,
        role: 'technician',
        token_hash: hashOpaqueToken(token),
        expires_at: new Date(Date.now() + 3600_000),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return { id: row.id, token };
  }

  async freshResetToken(): Promise<string> {
    const user = await this.freshUser('own');
    const token = unique('reset-token-0123456789-');
    await this.db
      .insertInto('password_resets')
      .values({
        user_id: user,
        token_hash: hashOpaqueToken(token),
        expires_at: new Date(Date.now() + 3600_000),
      })
      .execute();
    return token;
  }
}

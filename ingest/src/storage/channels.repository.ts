import { Inject, Injectable } from '@nestjs/common';
import { sql } from 'kysely';
import { DATABASE, type Database } from '../database/database.js';

export type ChannelValueKind = 'number' | 'boolean' | 'string';

/** A channel to find or create: one measurement name at one site. */
export interface ChannelKey {
  siteId: string;
  name: string;
  unit: string;
  kind: ChannelValueKind;
}

export interface ChannelRow {
  id: number;
  siteId: string;
  name: string;
  kind: ChannelValueKind;
}

/** Channels (one per site and measurement name), created on first sight of a name. */
@Injectable()
export class ChannelsRepository {
  constructor(@Inject(DATABASE) private readonly db: Database) {}

  /** Finds the channels, creating the missing ones (concurrent creators are harmless). */
  async findOrCreate(keys: readonly ChannelKey[]): Promise<ChannelRow[]> {
    if (keys.length === 0) return [];
    const sites = keys.map((k) => k.siteId);
    const names = keys.map((k) => k.name);
    await sql`
      insert into channels (site_id, name, unit, value_kind)
      select * from unnest(${sites}::uuid[], ${names}::text[], ${keys.map((k) => k.unit)}::text[],
                           ${keys.map((k) => k.kind)}::text[])
      on conflict (site_id, name) do nothing`.execute(this.db);
    const { rows } = await sql<{ id: number; site_id: string; name: string; value_kind: string }>`
      select c.id, c.site_id, c.name, c.value_kind
      from unnest(${sites}::uuid[], ${names}::text[]) as k(site_id, name)
      join channels c on c.site_id = k.site_id and c.name = k.name`.execute(this.db);
    return rows.map((r) => ({
      id: r.id,
      siteId: r.site_id,
      name: r.name,
      kind: r.value_kind as ChannelValueKind,
    }));
  }
}

import { Injectable } from '@nestjs/common';
import {
  ChannelsRepository,
  type ChannelKey,
  type ChannelRow,
} from '../storage/channels.repository.js';

/**
 * Channel ids by (site, name), kept in memory: after warm-up a batch needs no channel lookups.
 * Channels are never renamed, and a deleted site takes its channels along (readings carry no
 * foreign key, so a stale id can only write rows nobody reads).
 */
@Injectable()
export class ChannelCache {
  /** Site id → measurement name → channel (one site lookup per pack, then one per record). */
  private readonly bySite = new Map<string, Map<string, ChannelRow>>();
  private count = 0;

  constructor(private readonly channels: ChannelsRepository) {}

  /** The cached channels of a site, by name. */
  site(siteId: string): ReadonlyMap<string, ChannelRow> | undefined {
    return this.bySite.get(siteId);
  }

  get(siteId: string, name: string): ChannelRow | undefined {
    return this.bySite.get(siteId)?.get(name);
  }

  /** Loads (or creates) the given channels, none of which is cached yet. */
  async load(keys: readonly ChannelKey[]): Promise<void> {
    if (keys.length === 0) return;
    for (const row of await this.channels.findOrCreate(keys)) {
      let site = this.bySite.get(row.siteId);
      if (!site) this.bySite.set(row.siteId, (site = new Map()));
      if (!site.has(row.name)) this.count += 1;
      site.set(row.name, row);
    }
  }

  get size(): number {
    return this.count;
  }
}

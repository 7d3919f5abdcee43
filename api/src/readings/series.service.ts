import { Injectable } from '@nestjs/common';
import type { VisibleSite } from '../access/session-user.js';
import { badRequest } from '../common/api-error.js';
import type { SeriesQuery, SeriesResponse } from './dto/series.dto.js';
import { ReadingsRepository } from './readings.repository.js';
import { pickResolution } from './series-resolution.js';

@Injectable()
export class SeriesService {
  constructor(private readonly readings: ReadingsRepository) {}

  async channels(site: VisibleSite) {
    const rows = await this.readings.channels(site);
    return rows.map((c) => ({
      id: c.id,
      name: c.name,
      unit: c.unit,
      valueKind: c.value_kind,
      lastTime: c.last_time,
      lastValue: c.last_value,
      lastText: c.last_text,
    }));
  }

  async series(site: VisibleSite, query: SeriesQuery): Promise<SeriesResponse> {
    const all = await this.readings.channels(site);
    const byName = new Map(all.map((c) => [c.name, c]));
    const unknown = query.channels.filter((n) => !byName.has(n));
    if (unknown.length) {
      throw badRequest('unknown_channel', `This site has no channel named ${unknown.join(', ')}`, [
        { path: 'channels', message: `unknown: ${unknown.join(', ')}` },
      ]);
    }
    const text = query.channels.filter((n) => byName.get(n)!.value_kind === 'string');
    if (text.length) {
      throw badRequest(
        'text_channel',
        `${text.join(', ')} carries text, not numbers; read it from the channel list or the CSV export`,
        [{ path: 'channels', message: `text channels: ${text.join(', ')}` }],
      );
    }
    const chosen = query.channels.map((n) => byName.get(n)!);
    const span = (query.to.getTime() - query.from.getTime()) / 1000;
    const [rawFrom, minutesFrom] = await Promise.all([
      this.readings.rawKeptFrom(),
      this.readings.minutesKeptFrom(),
    ]);
    const kept = (from: Date | null) => from !== null && query.from >= from;
    const resolution = pickResolution(
      span,
      site.reportingIntervalS,
      kept(rawFrom) ? 'raw' : kept(minutesFrom) ? 'minute' : 'ten_minute',
    );
    const rows = await this.readings.series(
      site,
      chosen.map((c) => c.id),
      resolution.source,
      resolution.stepSeconds,
      query.from,
      query.to,
    );
    const series = chosen.map((c) => ({
      channel: c.name,
      unit: c.unit,
      valueKind: c.value_kind as 'number' | 'boolean',
      t: [] as number[],
      mean: [] as number[],
      min: [] as number[],
      max: [] as number[],
    }));
    const index = new Map(chosen.map((c, i) => [c.id, series[i]!]));
    let rowsRead = 0;
    for (const r of rows) {
      const s = index.get(r.channel_id)!;
      s.t.push(r.t);
      s.mean.push(r.mean);
      s.min.push(r.min);
      s.max.push(r.max);
      rowsRead += r.rows ?? 1;
    }
    return { siteId: site.id, from: query.from, to: query.to, resolution, rowsRead, series };
  }
}

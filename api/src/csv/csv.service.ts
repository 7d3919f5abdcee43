import { Readable } from 'node:stream';
import { Injectable } from '@nestjs/common';
import type { MultipartFile, MultipartValue } from '@fastify/multipart';
import type { Database } from '@wellkept/db';
import { stringify } from 'csv-stringify';
import type { FastifyRequest } from 'fastify';
import type { VisibleSite } from '../access/session-user.js';
import { ApiError, badRequest } from '../common/api-error.js';
import { fieldProblems } from '../common/zod-validation.pipe.js';
import { InjectDb } from '../database/database.module.js';
import { ReadingsRepository } from '../readings/readings.repository.js';
import { CsvExportRepository } from './csv-export.repository.js';
import { parseRows, readTable, resolveMapping, suggestMapping } from './csv-import.parser.js';
import { type ExportReadingsQuery, type ImportMapping, importMapping } from './dto/csv.dto.js';
import { HistoryWriterRepository } from './history-writer.repository.js';

interface ImportUpload {
  content: Buffer;
  mapping: ImportMapping | null;
  acceptGoodRows: boolean;
}

@Injectable()
export class CsvService {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly readings: ReadingsRepository,
    private readonly exports: CsvExportRepository,
    private readonly writer: HistoryWriterRepository,
  ) {}

  // Export -------------------------------------------------------------------------------

  /** One row per instant, one column per channel (the import reads the same layout back). */
  async exportReadings(site: VisibleSite, query: ExportReadingsQuery): Promise<Readable> {
    if (query.from >= query.to)
      throw badRequest('validation_failed', 'from must be before to', [
        { path: 'from', message: 'must be before to' },
      ]);
    // Past the raw retention only the buckets remain: an empty file would read as "no data".
    const rawFrom = await this.readings.rawKeptFrom();
    if (rawFrom && query.to <= rawFrom) {
      const day = rawFrom.toISOString().slice(0, 10);
      throw badRequest(
        'raw_readings_not_kept',
        `Raw readings before ${day} are no longer kept (older days are dropped after the raw retention); export a range from ${day} on, or chart older days, which come from minute averages`,
        [{ path: 'to', message: `must be after ${day}, where the raw readings kept begin` }],
      );
    }
    const all = await this.readings.channels(site);
    const chosen = query.channels ? all.filter((c) => query.channels!.includes(c.name)) : all;
    const unknown = (query.channels ?? []).filter((n) => !all.some((c) => c.name === n));
    if (unknown.length)
      throw badRequest('unknown_channel', `This site has no channel named ${unknown.join(', ')}`);
    const columns = chosen.map((c) => c.name);
    const index = new Map(chosen.map((c, i) => [c.id, i]));
    const rows = this.exports.readings(
      site,
      chosen.map((c) => c.id),
      query.from,
      query.to,
    );
    async function* pivot() {
      yield ['time', ...columns];
      let time: number | null = null;
      let cells: string[] = [];
      for await (const r of rows) {
        const t = r.time.getTime();
        if (t !== time) {
          if (time !== null) yield [new Date(time).toISOString(), ...cells];
          time = t;
          cells = new Array<string>(columns.length).fill('');
        }
        cells[index.get(r.channel_id)!] = r.text_value ?? (r.value === null ? '' : String(r.value));
      }
      if (time !== null) yield [new Date(time).toISOString(), ...cells];
    }
    return Readable.from(pivot()).pipe(stringify());
  }

  async exportPumpRuns(
    site: VisibleSite,
    filter: { pumpId?: string; from?: Date; to?: Date },
  ): Promise<Readable> {
    const runs = this.exports.pumpRuns(site, filter);
    async function* lines() {
      yield [
        'started_at',
        'ended_at',
        'pump',
        'duration_s',
        'energy_wh',
        'mean_current_a',
        'water_m3',
        'water_source',
        'spans_gap',
      ];
      for await (const r of runs) {
        yield [
          r.started_at.toISOString(),
          r.ended_at?.toISOString() ?? '',
          r.pump_key,
          r.duration_s ?? '',
          r.energy_wh ?? '',
          r.mean_current_a ?? '',
          r.water_m3 ?? '',
          r.water_source ?? '',
          r.spans_gap ? 'true' : 'false',
        ];
      }
    }
    return Readable.from(lines()).pipe(stringify());
  }

  // Import -------------------------------------------------------------------------------

  async preview(site: VisibleSite, request: FastifyRequest) {
    const upload = await readUpload(request);
    const table = this.table(upload.content);
    const suggested = suggestMapping(table.columns);
    const base = {
      columns: table.columns,
      suggestedMapping: suggested,
      dataRows: table.rows.length,
    };
    if (!upload.mapping) {
      return {
        ...base,
        mapping: null,
        goodRows: 0,
        badRows: 0,
        readings: 0,
        sample: [],
        errors: [],
      };
    }
    const parsed = await this.parse(site, table, upload.mapping);
    return {
      ...base,
      mapping: upload.mapping,
      goodRows: parsed.good.length,
      badRows: parsed.badRows,
      readings: parsed.good.reduce((n, r) => n + r.values.length, 0),
      sample: parsed.good.slice(0, 20).map((r) => ({
        line: r.line,
        time: new Date(r.t * 1000),
        values: Object.fromEntries(r.values.map((v) => [v.m.name, v.text ?? v.value!])),
      })),
      errors: parsed.errors.slice(0, 500),
    };
  }

  async commit(site: VisibleSite, request: FastifyRequest) {
    const upload = await readUpload(request);
    if (!upload.mapping)
      throw badRequest('validation_failed', 'Send the column mapping in the field "mapping"', [
        { path: 'mapping', message: 'required' },
      ]);
    const table = this.table(upload.content);
    const parsed = await this.parse(site, table, upload.mapping);
    if (parsed.badRows > 0 && !upload.acceptGoodRows) {
      throw new ApiError(
        422,
        'rows_have_errors',
        `${parsed.badRows} row${parsed.badRows === 1 ? ' has' : 's have'} errors; nothing was stored. Fix the file, or confirm with acceptGoodRows=true to store the ${parsed.good.length} good rows only`,
        parsed.errors.slice(0, 100).map((e) => ({
          path: `line ${e.line}${e.column ? `, ${e.column}` : ''}`,
          message: e.message,
        })),
      );
    }
    const written = await this.writer.write(site, parsed.good);
    return {
      stored: written.stored,
      duplicates: written.total - written.stored,
      goodRows: parsed.good.length,
      skippedBadRows: parsed.badRows,
      channelsCreated: written.channelsCreated,
    };
  }

  private table(content: Buffer) {
    try {
      return readTable(content);
    } catch (error) {
      throw badRequest('unreadable_csv', (error as Error).message);
    }
  }

  private async parse(
    site: VisibleSite,
    table: ReturnType<typeof readTable>,
    mapping: ImportMapping,
  ) {
    const battery = await this.db
      .selectFrom('battery_banks')
      .select('nominal_voltage_v')
      .where('site_id', '=', site.id)
      .executeTakeFirst();
    const resolved = resolveMapping(mapping, table.columns, {
      batteryNominalVolts: battery?.nominal_voltage_v,
    });
    if ('problems' in resolved) {
      throw badRequest(
        'bad_mapping',
        `The column mapping does not fit the file: ${resolved.problems[0]!.message}`,
        resolved.problems,
      );
    }
    return parseRows(table, resolved, mapping.timeFormat, site.timeZone);
  }
}

/** Reads the multipart upload: a "file" part and the fields "mapping" (JSON) and "acceptGoodRows". */
async function readUpload(request: FastifyRequest): Promise<ImportUpload> {
  if (!request.isMultipart())
    throw badRequest('no_file', 'Send the CSV as multipart/form-data in a field named "file"');
  let content: Buffer | null = null;
  const fields: Record<string, string> = {};
  for await (const part of request.parts()) {
    if (part.type === 'file') {
      try {
        content = await (part as MultipartFile).toBuffer();
      } catch (error) {
        if ((error as { code?: string }).code === 'FST_REQ_FILE_TOO_LARGE')
          throw new ApiError(413, 'file_too_large', 'The CSV file is larger than the upload limit');
        throw error;
      }
    } else {
      fields[part.fieldname] = String((part as MultipartValue).value);
    }
  }
  if (!content)
    throw badRequest('no_file', 'Send the CSV as multipart/form-data in a field named "file"');
  let mapping: ImportMapping | null = null;
  if (fields.mapping) {
    let json: unknown;
    try {
      json = JSON.parse(fields.mapping);
    } catch {
      throw badRequest('validation_failed', 'The field "mapping" is not valid JSON', [
        { path: 'mapping', message: 'is not valid JSON' },
      ]);
    }
    const parsed = importMapping.safeParse(json);
    if (!parsed.success) {
      const fieldsList = fieldProblems(parsed.error).map((f) => ({
        path: `mapping.${f.path}`,
        message: f.message,
      }));
      throw badRequest(
        'validation_failed',
        `The column mapping is not valid: ${fieldsList[0]!.path}: ${fieldsList[0]!.message}`,
        fieldsList,
      );
    }
    mapping = parsed.data;
  }
  return { content, mapping, acceptGoodRows: fields.acceptGoodRows === 'true' };
}

import { Injectable } from '@nestjs/common';
import type { z } from 'zod';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { toCamel, toSnake } from '../common/case.js';
import { badRequest, type FieldProblem, notFound } from '../common/api-error.js';
import { fieldProblems } from '../common/zod-validation.pipe.js';
import {
  batteryBankBody,
  COLLECTIONS,
  type CollectionKind,
  NOTE_KINDS,
  tankProblems,
  wellBody,
} from './dto/equipment.dto.js';
import { type EquipmentTable, EquipmentRepository } from './equipment.repository.js';

const NOTE_TABLES: Record<(typeof NOTE_KINDS)[number], EquipmentTable> = {
  pumps: 'pumps',
  tanks: 'tanks',
  'pv-arrays': 'pv_arrays',
  'float-switches': 'float_switches',
  'battery-bank': 'battery_banks',
  well: 'wells',
};

/** Fields that point at other equipment of the same site. */
const REFERENCES: Record<string, EquipmentTable> = {
  fillsTankId: 'tanks',
  drawsFromTankId: 'tanks',
  tankId: 'tanks',
  pumpId: 'pumps',
};

@Injectable()
export class EquipmentService {
  constructor(
    private readonly equipment: EquipmentRepository,
    private readonly audit: AuditRepository,
  ) {}

  async all(site: VisibleSite) {
    const [battery, wells, pumps, tanks, pvArrays, floats] = await Promise.all(
      (['battery_banks', 'wells', 'pumps', 'tanks', 'pv_arrays', 'float_switches'] as const).map(
        (t) => this.equipment.list(site, t),
      ),
    );
    return {
      batteryBank: battery![0] ? toCamel(battery![0]) : null,
      well: wells![0] ? toCamel(wells![0]) : null,
      pumps: pumps!.map(toCamel),
      tanks: tanks!.map(toCamel),
      pvArrays: pvArrays!.map(toCamel),
      floatSwitches: floats!.map(toCamel),
    };
  }

  async create(user: SessionUser, site: VisibleSite, kind: CollectionKind, body: unknown) {
    const spec = COLLECTIONS[kind];
    const values = parse(spec.create, body);
    await this.checkReferences(site, values);
    const row = await this.equipment.insert(site, spec.table, toSnake(values));
    await this.record(user, site, `equipment_created`, kind, String(row.id));
    return toCamel(row);
  }

  async update(
    user: SessionUser,
    site: VisibleSite,
    kind: CollectionKind,
    id: string,
    body: unknown,
  ) {
    const spec = COLLECTIONS[kind];
    const values = parse(spec.patch, body);
    if (!Object.keys(values).length)
      throw badRequest('validation_failed', 'Change at least one field');
    await this.checkReferences(site, values);
    if (kind === 'tanks') {
      // The whole tank after the change must still make sense (geometry, pressures).
      const current = (await this.equipment.list(site, 'tanks')).find((t) => t.id === id);
      if (!current) throw notFound('Tank');
      const problems = tankProblems({ ...toCamel(current), ...values });
      if (problems.length) throw invalid(problems);
    }
    const row = await this.equipment.update(site, spec.table, id, toSnake(values));
    if (!row) throw notFound('Equipment');
    await this.record(user, site, 'equipment_updated', kind, id, Object.keys(values));
    return toCamel(row);
  }

  async delete(user: SessionUser, site: VisibleSite, kind: CollectionKind, id: string) {
    if (!(await this.equipment.delete(site, COLLECTIONS[kind].table, id)))
      throw notFound('Equipment');
    await this.record(user, site, 'equipment_deleted', kind, id);
  }

  async putBatteryBank(user: SessionUser, site: VisibleSite, body: unknown) {
    const values = parse(batteryBankBody, body);
    const row = await this.equipment.upsertSingleton(site, 'battery_banks', toSnake(values));
    await this.record(user, site, 'equipment_updated', 'battery-bank', String(row.id));
    return toCamel(row);
  }

  async putWell(user: SessionUser, site: VisibleSite, body: unknown) {
    const values = parse(wellBody, body);
    const row = await this.equipment.upsertSingleton(site, 'wells', toSnake(values));
    await this.record(user, site, 'equipment_updated', 'well', String(row.id));
    return toCamel(row);
  }

  async deleteSingleton(user: SessionUser, site: VisibleSite, which: 'battery-bank' | 'well') {
    const table = which === 'well' ? 'wells' : 'battery_banks';
    if (!(await this.equipment.deleteSingleton(site, table)))
      throw notFound(which === 'well' ? 'Well' : 'Battery bank');
    await this.record(user, site, 'equipment_deleted', which, site.id);
  }

  /** Technicians may write notes on any piece of equipment, and nothing else. */
  async setNotes(
    user: SessionUser,
    site: VisibleSite,
    kind: (typeof NOTE_KINDS)[number],
    id: string,
    notes: string,
  ) {
    const row = await this.equipment.update(site, NOTE_TABLES[kind], id, { notes });
    if (!row) throw notFound('Equipment');
    return toCamel(row);
  }

  private async checkReferences(site: VisibleSite, values: Record<string, unknown>) {
    const problems: FieldProblem[] = [];
    for (const [field, table] of Object.entries(REFERENCES)) {
      const id = values[field];
      if (typeof id !== 'string') continue;
      const found = await this.equipment.idsAtSite(site, table, [id]);
      if (!found.has(id)) {
        problems.push({
          path: field,
          message: `is not a ${table === 'tanks' ? 'tank' : 'pump'} of this site`,
        });
      }
    }
    if (problems.length) throw invalid(problems);
  }

  private record(
    user: SessionUser,
    site: VisibleSite,
    action: string,
    kind: string,
    id: string,
    changed?: string[],
  ) {
    return this.audit.record({
      companyId: user.companyId,
      userId: user.id,
      action,
      targetType: kind,
      targetId: id,
      details: { siteId: site.id, ...(changed ? { changed } : {}) },
    });
  }
}

function parse<T extends z.ZodType>(schema: T, body: unknown): Record<string, unknown> {
  const parsed = schema.safeParse(body);
  if (!parsed.success) throw invalid(fieldProblems(parsed.error));
  return parsed.data as Record<string, unknown>;
}

function invalid(fields: FieldProblem[]) {
  return badRequest(
    'validation_failed',
    `The request body is not valid: ${fields
      .slice(0, 3)
      .map((f) => `${f.path}: ${f.message}`)
      .join('; ')}`,
    fields,
  );
}

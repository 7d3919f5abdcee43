import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';
import type { CreateVisitBody, UpdateVisitBody } from './dto/visits.dto.js';

export type AttachmentType = 'image/jpeg' | 'image/png' | 'image/webp' | 'application/pdf';

@Injectable()
export class VisitsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  private visits(site: VisibleSite) {
    return this.db
      .selectFrom('service_visits as v')
      .leftJoin('users as u', 'u.id', 'v.technician_id')
      .selectAll('v')
      .select('u.name as technician_name')
      .where('v.site_id', '=', site.id);
  }

  list(site: VisibleSite, limit: number) {
    return this.visits(site).orderBy('v.visited_at', 'desc').limit(limit).execute();
  }

  find(site: VisibleSite, id: string) {
    return this.visits(site).where('v.id', '=', id).executeTakeFirst();
  }

  attachments(site: VisibleSite, visitIds: string[]) {
    if (!visitIds.length) return Promise.resolve([]);
    return this.db
      .selectFrom('attachments')
      .selectAll()
      .where('site_id', '=', site.id)
      .where('visit_id', 'in', visitIds)
      .orderBy('created_at')
      .execute();
  }

  async create(site: VisibleSite, userId: string, body: CreateVisitBody): Promise<string> {
    const row = await this.db
      .insertInto('service_visits')
      .values({
        site_id: site.id,
        visited_at: body.visitedAt,
        technician_id: body.technicianId ?? userId,
        summary: body.summary,
        findings: body.findings,
        parts_replaced: body.partsReplaced,
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return row.id;
  }

  async update(site: VisibleSite, id: string, body: UpdateVisitBody): Promise<boolean> {
    const r = await this.db
      .updateTable('service_visits')
      .set({
        visited_at: body.visitedAt,
        technician_id: body.technicianId,
        summary: body.summary,
        findings: body.findings,
        parts_replaced: body.partsReplaced,
        updated_at: new Date(),
      })
      .where('id', '=', id)
      .where('site_id', '=', site.id)
      .executeTakeFirst();
    return Number(r.numUpdatedRows) === 1;
  }

  /** Deletes the visit and returns the storage keys of its files (to remove from disk). */
  async delete(site: VisibleSite, id: string): Promise<string[] | null> {
    return this.db.transaction().execute(async (trx) => {
      const files = await trx
        .selectFrom('attachments')
        .select(['storage_key', 'thumbnail_key'])
        .where('visit_id', '=', id)
        .where('site_id', '=', site.id)
        .execute();
      const r = await trx
        .deleteFrom('service_visits')
        .where('id', '=', id)
        .where('site_id', '=', site.id)
        .executeTakeFirst();
      if (Number(r.numDeletedRows) !== 1) return null;
      return files.flatMap((f) => [f.storage_key, ...(f.thumbnail_key ? [f.thumbnail_key] : [])]);
    });
  }

  async isTechnicianOfCompany(companyId: string, userId: string): Promise<boolean> {
    const row = await this.db
      .selectFrom('users')
      .select('id')
      .where('id', '=', userId)
      .where('company_id', '=', companyId)
      .where('role', 'in', ['admin', 'technician'])
      .executeTakeFirst();
    return row !== undefined;
  }

  async insertAttachment(values: {
    id: string;
    visitId: string;
    site: VisibleSite;
    fileName: string;
    contentType: AttachmentType;
    sizeBytes: number;
    sha256: string;
    storageKey: string;
    thumbnailKey: string | null;
    uploadedBy: string;
  }) {
    return this.db
      .insertInto('attachments')
      .values({
        id: values.id,
        visit_id: values.visitId,
        site_id: values.site.id,
        file_name: values.fileName,
        content_type: values.contentType,
        size_bytes: values.sizeBytes,
        sha256: values.sha256,
        storage_key: values.storageKey,
        thumbnail_key: values.thumbnailKey,
        uploaded_by: values.uploadedBy,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
  }

  findAttachment(site: VisibleSite, id: string) {
    return this.db
      .selectFrom('attachments')
      .selectAll()
      .where('id', '=', id)
      .where('site_id', '=', site.id)
      .executeTakeFirst();
  }

  async deleteAttachment(site: VisibleSite, id: string) {
    return this.db
      .deleteFrom('attachments')
      .where('id', '=', id)
      .where('site_id', '=', site.id)
      .returning(['storage_key', 'thumbnail_key'])
      .executeTakeFirst();
  }
}

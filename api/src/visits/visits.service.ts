import { Inject, Injectable } from '@nestjs/common';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import type { MultipartFile } from '@fastify/multipart';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { ApiError, badRequest, notFound } from '../common/api-error.js';
import { AttachmentStorage, checkFileName } from './attachment-storage.js';
import type { CreateVisitBody, UpdateVisitBody } from './dto/visits.dto.js';
import { VisitsRepository } from './visits.repository.js';

type VisitRow = NonNullable<Awaited<ReturnType<VisitsRepository['find']>>>;
type AttachmentRow = Awaited<ReturnType<VisitsRepository['attachments']>>[number];

@Injectable()
export class VisitsService {
  constructor(
    private readonly visits: VisitsRepository,
    private readonly storage: AttachmentStorage,
    @Inject(API_CONFIG) private readonly config: ApiConfig,
  ) {}

  async list(site: VisibleSite, limit: number) {
    const rows = await this.visits.list(site, limit);
    const files = await this.visits.attachments(
      site,
      rows.map((r) => r.id),
    );
    return rows.map((v) =>
      toVisitDto(
        v,
        files.filter((f) => f.visit_id === v.id),
      ),
    );
  }

  async get(site: VisibleSite, id: string) {
    const visit = await this.visits.find(site, id);
    if (!visit) throw notFound('Service visit');
    return toVisitDto(visit, await this.visits.attachments(site, [id]));
  }

  async create(user: SessionUser, site: VisibleSite, body: CreateVisitBody) {
    await this.checkTechnician(user, body.technicianId);
    const id = await this.visits.create(site, user.id, body);
    return this.get(site, id);
  }

  async update(user: SessionUser, site: VisibleSite, id: string, body: UpdateVisitBody) {
    await this.checkTechnician(user, body.technicianId);
    if (!(await this.visits.update(site, id, body))) throw notFound('Service visit');
    return this.get(site, id);
  }

  async delete(site: VisibleSite, id: string) {
    const keys = await this.visits.delete(site, id);
    if (!keys) throw notFound('Service visit');
    await this.storage.remove(keys);
  }

  async attach(
    user: SessionUser,
    site: VisibleSite,
    visitId: string,
    part: MultipartFile | undefined,
  ) {
    if (!(await this.visits.find(site, visitId))) throw notFound('Service visit');
    if (!part)
      throw badRequest('no_file', 'Send the file as multipart/form-data in a field named "file"');
    const fileName = checkFileName(part.filename);
    let content: Buffer;
    try {
      content = await part.toBuffer();
    } catch (error) {
      if ((error as { code?: string }).code === 'FST_REQ_FILE_TOO_LARGE') {
        throw new ApiError(
          413,
          'file_too_large',
          `The file is larger than the ${+(this.config.uploads.maxBytes / 1048576).toFixed(1)} MB limit`,
        );
      }
      throw error;
    }
    const stored = await this.storage.store(site.id, content);
    try {
      const row = await this.visits.insertAttachment({
        id: stored.id,
        visitId,
        site,
        fileName,
        contentType: stored.contentType,
        sizeBytes: stored.sizeBytes,
        sha256: stored.sha256,
        storageKey: stored.storageKey,
        thumbnailKey: stored.thumbnailKey,
        uploadedBy: user.id,
      });
      return toAttachmentDto(row);
    } catch (error) {
      await this.storage.remove([
        stored.storageKey,
        ...(stored.thumbnailKey ? [stored.thumbnailKey] : []),
      ]);
      throw error;
    }
  }

  async file(site: VisibleSite, attachmentId: string, thumbnail: boolean) {
    const row = await this.visits.findAttachment(site, attachmentId);
    if (!row) throw notFound('Attachment');
    const key = thumbnail ? row.thumbnail_key : row.storage_key;
    if (!key) throw notFound('Thumbnail');
    return {
      stream: this.storage.open(key),
      contentType: thumbnail ? 'image/webp' : row.content_type,
      fileName: row.file_name,
    };
  }

  async deleteAttachment(site: VisibleSite, attachmentId: string) {
    const row = await this.visits.deleteAttachment(site, attachmentId);
    if (!row) throw notFound('Attachment');
    await this.storage.remove([row.storage_key, ...(row.thumbnail_key ? [row.thumbnail_key] : [])]);
  }

  private async checkTechnician(user: SessionUser, technicianId: string | null | undefined) {
    if (technicianId && !(await this.visits.isTechnicianOfCompany(user.companyId, technicianId))) {
      throw badRequest(
        'validation_failed',
        'The technician must be an admin or technician of your company',
        [{ path: 'technicianId', message: 'is not a technician of your company' }],
      );
    }
  }
}

function toAttachmentDto(a: AttachmentRow) {
  return {
    id: a.id,
    fileName: a.file_name,
    contentType: a.content_type,
    sizeBytes: a.size_bytes,
    hasThumbnail: a.thumbnail_key !== null,
    createdAt: a.created_at,
  };
}

function toVisitDto(v: VisitRow, files: AttachmentRow[]) {
  return {
    id: v.id,
    siteId: v.site_id,
    visitedAt: v.visited_at,
    technicianId: v.technician_id,
    technicianName: v.technician_name,
    summary: v.summary,
    findings: v.findings,
    partsReplaced: v.parts_replaced,
    createdAt: v.created_at,
    updatedAt: v.updated_at,
    attachments: files.map(toAttachmentDto),
  };
}

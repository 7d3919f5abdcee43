import { createHash, randomUUID } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import { dirname, join, resolve, sep } from 'node:path';
import { Inject, Injectable } from '@nestjs/common';
import { fileTypeFromBuffer } from 'file-type';
import sharp from 'sharp';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { ApiError } from '../common/api-error.js';
import type { AttachmentType } from './visits.repository.js';

const ALLOWED: Record<string, { type: AttachmentType; ext: string }> = {
  'image/jpeg': { type: 'image/jpeg', ext: 'jpg' },
  'image/png': { type: 'image/png', ext: 'png' },
  'image/webp': { type: 'image/webp', ext: 'webp' },
  'application/pdf': { type: 'application/pdf', ext: 'pdf' },
};

/** File names people see; never used to build a path on disk. */
export function checkFileName(name: string): string {
  const trimmed = name.trim();
  if (
    !trimmed ||
    trimmed.length > 200 ||
    /[/\\]/.test(trimmed) ||
    trimmed.split('.').every((p) => p === '') ||
    trimmed.includes('..') ||
    // eslint-disable-next-line no-control-regex
    /[\u0000-\u001f\u007f]/.test(trimmed)
  ) {
    throw new ApiError(
      400,
      'bad_file_name',
      'The file name is not accepted: use a plain name without folders, "..", or control characters (at most 200 characters)',
    );
  }
  return trimmed;
}

export interface StoredFile {
  id: string;
  contentType: AttachmentType;
  sizeBytes: number;
  sha256: string;
  storageKey: string;
  thumbnailKey: string | null;
}

/**
 * Photos and PDFs of service visits under `<data>/uploads/<site>/`. The type is decided by the
 * content (magic bytes, via file-type), never by the name or the declared type; files are named
 * by a fresh id, so nothing the client sends ends up in a path.
 */
@Injectable()
export class AttachmentStorage {
  private readonly root: string;

  constructor(@Inject(API_CONFIG) config: ApiConfig) {
    this.root = resolve(config.uploads.dir);
  }

  async store(siteId: string, content: Buffer): Promise<StoredFile> {
    if (content.length === 0) throw new ApiError(400, 'empty_file', 'The file is empty');
    const sniffed = await fileTypeFromBuffer(content);
    const allowed = sniffed ? ALLOWED[sniffed.mime] : undefined;
    if (!allowed) {
      throw new ApiError(
        415,
        'unsupported_file_type',
        `Only JPEG, PNG or WebP photos and PDF documents are accepted; this file's content is ${
          sniffed ? `${sniffed.mime}` : 'not a recognised format'
        }, whatever its name says`,
      );
    }
    const id = randomUUID();
    const storageKey = `${siteId}/${id}.${allowed.ext}`;
    await this.write(storageKey, content);
    let thumbnailKey: string | null = null;
    if (allowed.type.startsWith('image/')) {
      try {
        const thumb = await sharp(content)
          .rotate()
          .resize(320, 320, { fit: 'inside' })
          .webp({ quality: 75 })
          .toBuffer();
        thumbnailKey = `${siteId}/${id}.thumb.webp`;
        await this.write(thumbnailKey, thumb);
      } catch {
        await this.remove([storageKey]);
        throw new ApiError(
          400,
          'unreadable_image',
          'The image could not be read; it may be damaged',
        );
      }
    }
    return {
      id,
      contentType: allowed.type,
      sizeBytes: content.length,
      sha256: createHash('sha256').update(content).digest('hex'),
      storageKey,
      thumbnailKey,
    };
  }

  open(key: string) {
    return createReadStream(this.path(key));
  }

  async remove(keys: string[]): Promise<void> {
    await Promise.all(keys.map((k) => rm(this.path(k), { force: true })));
  }

  private async write(key: string, content: Buffer): Promise<void> {
    const path = this.path(key);
    await mkdir(dirname(path), { recursive: true });
    await writeFile(path, content, { flag: 'wx' });
  }

  /** Keys are made here, but check anyway that a key stays inside the uploads folder. */
  private path(key: string): string {
    const path = resolve(join(this.root, key));
    if (!path.startsWith(this.root + sep))
      throw new Error('storage key outside the uploads folder');
    return path;
  }
}

import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { useTestDatabase } from '@wellkept/db/testing';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createSite, createUser, signIn } from './support/fixtures.js';
import { multipart } from './support/multipart.js';
import { startTestApp, type TestApp } from './support/test-app.js';

const t = useTestDatabase('api_uploads');
let app: TestApp;
let cookie: string;
let siteId: string;
let visitId: string;

/** A tiny valid PDF (one empty page). */
const PDF = Buffer.from(
  '%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[3 0 R]/Count 1>>endobj\n' +
    '3 0 obj<</Type/Page/Parent 2 0 R/MediaBox[0 0 200 200]>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n',
);
/** The start of a Linux executable (ELF header) followed by padding. */
const ELF = Buffer.concat([
  Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01, 0x00]),
  Buffer.alloc(120, 0),
]);

beforeAll(async () => {
  app = await startTestApp(t.url, {
    uploads: {
      dir: join((await import('node:os')).tmpdir(), `wk-up-${Date.now()}`),
      maxBytes: 64 * 1024,
    },
  });
  const company = await createCompany(t.db);
  siteId = await createSite(t.db, company);
  const tech = await createUser(t.db, company, 'technician');
  cookie = await signIn(app.app, tech.email);
  const visit = await app.app.inject({
    method: 'POST',
    url: `/api/sites/${siteId}/visits`,
    headers: { cookie },
    payload: {
      visitedAt: '2025-05-01T15:00:00Z',
      summary: 'Pulled the pump',
      partsReplaced: 'check valve',
    },
  });
  visitId = visit.json().id;
});
afterAll(async () => app?.close());

function upload(name: string, type: string, content: Buffer) {
  const body = multipart({}, { name, type, content });
  return app.app.inject({
    method: 'POST',
    url: `/api/sites/${siteId}/visits/${visitId}/attachments`,
    headers: { ...body.headers, cookie },
    payload: body.payload,
  });
}

describe('visit attachments', () => {
  it('stores a photo and makes a thumbnail; the download is the same bytes', async () => {
    const jpeg = await sharp({
      create: { width: 800, height: 600, channels: 3, background: '#2a6' },
    })
      .jpeg()
      .toBuffer();
    const res = await upload('pump head.jpg', 'image/jpeg', jpeg);
    expect(res.statusCode).toBe(201);
    const a = res.json();
    expect(a).toMatchObject({
      fileName: 'pump head.jpg',
      contentType: 'image/jpeg',
      sizeBytes: jpeg.length,
      hasThumbnail: true,
    });
    const row = await t.db
      .selectFrom('attachments')
      .selectAll()
      .where('id', '=', a.id)
      .executeTakeFirstOrThrow();
    expect(existsSync(join(app.config.uploads!.dir, row.storage_key))).toBe(true);
    expect(row.storage_key).toBe(`${siteId}/${a.id}.jpg`);

    const file = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/attachments/${a.id}`,
      headers: { cookie },
    });
    expect(file.statusCode).toBe(200);
    expect(file.headers['content-type']).toBe('image/jpeg');
    expect(file.rawPayload.equals(jpeg)).toBe(true);
    const thumb = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/attachments/${a.id}/thumbnail`,
      headers: { cookie },
    });
    const meta = await sharp(thumb.rawPayload).metadata();
    expect(meta).toMatchObject({ format: 'webp', width: 320, height: 240 });
  });

  it('stores a PDF (no thumbnail) even when its declared type is wrong', async () => {
    const res = await upload('report.pdf', 'application/octet-stream', PDF);
    expect(res.statusCode).toBe(201);
    expect(res.json()).toMatchObject({ contentType: 'application/pdf', hasThumbnail: false });
    const visit = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/visits/${visitId}`,
      headers: { cookie },
    });
    expect(visit.json().attachments.map((x: { fileName: string }) => x.fileName)).toEqual([
      'pump head.jpg',
      'report.pdf',
    ]);
  });

  it('refuses an executable renamed .jpg, judging by content', async () => {
    const res = await upload('photo.jpg', 'image/jpeg', ELF);
    expect(res.statusCode).toBe(415);
    expect(res.json().error.message).toMatch(
      /Only JPEG, PNG or WebP photos and PDF documents are accepted; this file's content is .*whatever its name says/,
    );
  });

  it('refuses a file over the size limit', async () => {
    const big = await sharp({
      create: {
        width: 1200,
        height: 1200,
        channels: 3,
        noise: { type: 'gaussian', mean: 128, sigma: 60 },
      },
    })
      .png()
      .toBuffer();
    expect(big.length).toBeGreaterThan(64 * 1024);
    const res = await upload('big.png', 'image/png', big);
    expect(res.statusCode).toBe(413);
    expect(res.json().error).toMatchObject({
      code: 'file_too_large',
      message: 'The file is larger than the 0.1 MB limit',
    });
  });

  it.each(['../../etc/passwd.jpg', '..\\..\\boot.ini', 'a/b.png', '..'])(
    'refuses the path-traversal name %s',
    async (name) => {
      const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } })
        .png()
        .toBuffer();
      const res = await upload(name, 'image/png', png);
      expect(res.statusCode).toBe(400);
      expect(res.json().error.code).toBe('bad_file_name');
    },
  );

  it('answers a request without a file clearly', async () => {
    const res = await app.app.inject({
      method: 'POST',
      url: `/api/sites/${siteId}/visits/${visitId}/attachments`,
      headers: { cookie },
      payload: {},
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.message).toContain('multipart/form-data');
    const stored = await t.db
      .selectFrom('attachments')
      .select('id')
      .where('visit_id', '=', visitId)
      .execute();
    expect(stored).toHaveLength(2);
  });
});

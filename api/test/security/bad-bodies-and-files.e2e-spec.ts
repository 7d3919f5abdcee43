import { readdirSync } from 'node:fs';
import { useTestDatabase } from '@wellkept/db/testing';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type Ctx, ROUTES } from '../authorization/route-table.js';
import { multipart } from '../support/multipart.js';
import { fingerprint, judge, type Probe, startProbe, UPLOAD_LIMIT } from './probe.js';

/**
 * Malformed bodies to every route that takes a JSON body, bad CSV files to the import routes,
 * bad files to the upload route: clear 4xx answers with readable messages, never a 5xx, and the
 * database (and the upload folder) unchanged.
 */

const t = useTestDatabase('api_bad_bodies');
let probe: Probe;

beforeAll(async () => {
  probe = await startProbe(t.db, t.url);
}, 120_000);
afterAll(async () => probe?.app.close());

const ctx = (): Ctx => ({
  world: probe.world,
  site: probe.world.sites.linked,
  siteKey: 'linked',
  tenant: 'own',
});

/** Routes whose request carries a JSON object body. */
const jsonRoutes = ROUTES.filter(
  (r) =>
    ['POST', 'PUT', 'PATCH'].includes(r.method) &&
    !r.path.includes('/attachments') &&
    !r.path.includes('/imports/'),
);

describe('malformed JSON bodies', () => {
  const CASES: {
    what: string;
    payload: string | Buffer;
    type: string;
    want: number[];
    objectLike?: boolean;
  }[] = [
    { what: 'cut-off JSON', payload: '{"name": "x', type: 'application/json', want: [400] },
    { what: 'a trailing comma', payload: '{"a": 1,}', type: 'application/json', want: [400] },
    { what: 'single quotes', payload: "{'a': 1}", type: 'application/json', want: [400] },
    { what: 'NaN', payload: '{"a": NaN}', type: 'application/json', want: [400] },
    {
      what: 'invalid UTF-8',
      payload: Buffer.from([0x7b, 0x22, 0xff, 0xfe, 0x22, 0x3a, 0x31, 0x7d]),
      type: 'application/json',
      want: [400],
      objectLike: true,
    },
    {
      what: 'prototype pollution',
      payload: '{"__proto__": {"role": "admin"}}',
      type: 'application/json',
      want: [400],
    },
    {
      what: 'constructor pollution',
      payload: '{"constructor": {"prototype": {"role": "admin"}}}',
      type: 'application/json',
      want: [400],
    },
    {
      what: 'a form-encoded body',
      payload: 'name=x&role=admin',
      type: 'application/x-www-form-urlencoded',
      want: [415],
    },
    { what: 'XML', payload: '<a>1</a>', type: 'application/xml', want: [415] },
    { what: 'a JSON array', payload: '[1, 2, 3]', type: 'application/json', want: [400] },
    { what: 'a JSON string', payload: '"hello"', type: 'application/json', want: [400] },
    { what: 'JSON null', payload: 'null', type: 'application/json', want: [400] },
    {
      what: 'nesting 5,000 deep',
      payload: `${'{"a":'.repeat(5000)}1${'}'.repeat(5000)}`,
      type: 'application/json',
      want: [400],
      objectLike: true,
    },
    {
      what: 'a 2 MB body',
      payload: JSON.stringify({ name: 'x'.repeat(2 * 1024 * 1024) }),
      type: 'application/json',
      want: [413],
    },
  ];

  it('answers each with a clear 4xx and changes nothing', async () => {
    const problems: string[] = [];
    let routes = 0;
    for (const row of jsonRoutes) {
      const probeReq = await row.request(ctx());
      if (probeReq.payload === undefined) {
        // A route without a body ignores one: it only must not fail.
        for (const c of CASES) {
          const req = await row.request(ctx());
          const answer = await probe.send(row.method, req.url, {
            payload: c.payload,
            headers: { 'content-type': c.type },
          });
          problems.push(...judge(`${row.method} ${row.path} [${c.what}]`, answer));
        }
        continue;
      }
      routes += 1;
      // A body whose fields are all optional accepts an object with only unknown keys, which
      // is what invalid UTF-8 (decoded with replacement characters) and deep nesting become.
      const emptyOk = (await probe.send(row.method, probeReq.url, { payload: {} })).status < 400;
      for (const c of CASES) {
        const req = await row.request(ctx());
        const before = await fingerprint(t.db);
        const answer = await probe.send(row.method, req.url, {
          payload: c.payload,
          headers: { 'content-type': c.type },
        });
        const what = `${row.method} ${row.path} [${c.what}]`;
        problems.push(...judge(what, answer));
        if (c.objectLike && emptyOk) continue;
        if (!c.want.includes(answer.status))
          problems.push(`${what}: got ${answer.status}, want ${c.want.join(' or ')}`);
        else if ((await fingerprint(t.db)) !== before)
          problems.push(`${what}: changed the database`);
      }
    }
    expect(routes).toBeGreaterThan(20);
    expect(problems).toEqual([]);
  });

  it('wrong types in every body field: 4xx naming the field, never a 5xx', async () => {
    const problems: string[] = [];
    for (const row of jsonRoutes) {
      const req = await row.request(ctx());
      if (!req.payload || typeof req.payload !== 'object' || Buffer.isBuffer(req.payload)) continue;
      const body = req.payload as Record<string, unknown>;
      for (const key of Object.keys(body)) {
        for (const wrong of [12345, false, { nested: { deep: [1] } }, 'x'.repeat(100_000), null]) {
          if (typeof body[key] === typeof wrong && wrong !== null) continue;
          const answer = await probe.send(row.method, req.url, {
            payload: { ...body, [key]: wrong },
          });
          const what = `${row.method} ${row.path} [${key} = ${JSON.stringify(wrong).slice(0, 20)}]`;
          problems.push(...judge(what, answer));
          if (answer.status === 400) {
            const fields = (answer.json as { error: { fields?: { path: string }[] } }).error.fields;
            if (fields && !fields.some((f) => f.path.startsWith(key)))
              problems.push(`${what}: the error does not name ${key}: ${JSON.stringify(fields)}`);
          }
        }
      }
    }
    expect(problems).toEqual([]);
  });
});

describe('bad CSV imports', () => {
  const MAPPING = JSON.stringify({
    timeColumn: 'time',
    columns: [{ column: 'battery/voltage', measurement: 'battery/voltage' }],
  });
  const ok = (rows: string) => Buffer.from(`time,battery/voltage\n${rows}`);
  const FILES: { what: string; content: Buffer; mapping?: string }[] = [
    { what: 'an empty file', content: Buffer.alloc(0) },
    {
      what: 'a PNG named .csv',
      content: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]),
    },
    {
      what: 'invalid UTF-8',
      content: Buffer.from([
        0x74, 0x69, 0x6d, 0x65, 0x2c, 0xff, 0xfe, 0x0a, 0x31, 0x2c, 0xc3, 0x28,
      ]),
    },
    { what: 'NUL bytes', content: ok('2025-01-01T00:00:00Z,25\u0000\n') },
    { what: 'an unterminated quote', content: ok('"2025-01-01T00:00:00Z,25.1\n') },
    { what: 'ragged rows', content: ok('2025-01-01T00:00:00Z\n2025-01-01T00:01:00Z,1,2,3\n') },
    { what: 'duplicate column names', content: Buffer.from('time,time,battery/voltage\n1,2,3\n') },
    {
      what: '5,000 columns',
      content: Buffer.from(`${Array.from({ length: 5000 }, (_, i) => `c${i}`).join(',')}\n`),
    },
    { what: 'a 200 KB cell', content: ok(`${'9'.repeat(200_000)},1\n`) },
    {
      what: 'semicolons for commas',
      content: Buffer.from('time;battery/voltage\n2025-01-01T00:00:00Z;25,1\n'),
    },
    { what: 'formula cells', content: ok("=cmd|' /C calc'!A0,=1+1\n@SUM(1),+25\n") },
    { what: 'SQL in cells', content: ok("2025-01-01T00:00:00Z,1'; drop table readings;--\n") },
    {
      what: 'NaN and Infinity',
      content: ok(
        '2025-01-01T00:00:00Z,NaN\n2025-01-01T00:01:00Z,Infinity\n2025-01-01T00:02:00Z,1e999\n',
      ),
    },
    {
      what: 'dates far out',
      content: ok('0001-01-01T00:00:00Z,25\n9999-12-31T23:59:59Z,25\n275760-09-13T00:00:00Z,25\n'),
    },
    {
      what: 'a malformed mapping',
      content: ok('2025-01-01T00:00:00Z,25\n'),
      mapping: '{"timeColumn": ',
    },
    {
      what: 'a mapping of the wrong shape',
      content: ok('2025-01-01T00:00:00Z,25\n'),
      mapping: '[1,2]',
    },
    {
      what: 'a mapping with SQL names',
      content: ok('2025-01-01T00:00:00Z,25\n'),
      mapping: JSON.stringify({
        timeColumn: "time'; --",
        columns: [{ column: 'battery/voltage', measurement: "x'; drop table readings; --" }],
      }),
    },
    {
      what: 'a file over the upload limit',
      content: ok('2025-01-01T00:00:00Z,25\n'.repeat(Math.ceil((UPLOAD_LIMIT + 10) / 24))),
    },
  ];

  it('preview and commit answer every bad file clearly and store nothing', async () => {
    const site = probe.world.sites.linked.siteId;
    const before = await fingerprint(t.db);
    const problems: string[] = [];
    for (const file of FILES) {
      for (const step of ['preview', 'commit'] as const) {
        const fields: Record<string, string> = {};
        const mapping = file.mapping ?? (step === 'commit' ? MAPPING : undefined);
        if (mapping !== undefined) fields.mapping = mapping;
        const body = multipart(fields, {
          name: 'logger.csv',
          type: 'text/csv',
          content: file.content,
        });
        const answer = await probe.send('POST', `/api/sites/${site}/imports/${step}`, {
          payload: body.payload,
          headers: body.headers,
          cookie: probe.technician,
        });
        const what = `${step}: ${file.what}`;
        problems.push(...judge(what, answer));
        if (step === 'commit' && answer.status < 400)
          problems.push(`${what}: a bad file was committed: ${answer.body.slice(0, 160)}`);
      }
    }
    expect(problems).toEqual([]);
    expect(await fingerprint(t.db)).toBe(before);
  });
});

describe('bad uploads', () => {
  it('refuses wrong, disguised, broken and oversize files clearly; stores nothing', async () => {
    const { siteId, visitId } = probe.world.sites.linked;
    const url = `/api/sites/${siteId}/visits/${visitId}/attachments`;
    const png = probe.world.png;
    const big = await sharp({
      create: {
        width: 900,
        height: 900,
        channels: 3,
        noise: { type: 'gaussian', mean: 128, sigma: 60 },
      },
    })
      .png()
      .toBuffer();
    expect(big.length).toBeGreaterThan(UPLOAD_LIMIT);
    const cases: { what: string; name: string; type: string; content: Buffer }[] = [
      {
        what: 'a Windows executable named .png',
        name: 'photo.png',
        type: 'image/png',
        content: Buffer.concat([Buffer.from('MZ\x90\x00'), Buffer.alloc(200)]),
      },
      {
        what: 'an HTML page named .jpg',
        name: 'photo.jpg',
        type: 'image/jpeg',
        content: Buffer.from('<!doctype html><script>alert(1)</script>'),
      },
      {
        what: 'an SVG with a script',
        name: 'drawing.svg',
        type: 'image/svg+xml',
        content: Buffer.from(
          '<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>',
        ),
      },
      {
        what: 'a shell script named .pdf',
        name: 'report.pdf',
        type: 'application/pdf',
        content: Buffer.from('#!/bin/sh\necho hi\n'),
      },
      {
        what: 'a ZIP named .pdf',
        name: 'report.pdf',
        type: 'application/pdf',
        content: Buffer.from([0x50, 0x4b, 0x03, 0x04, ...Array<number>(60).fill(0)]),
      },
      { what: 'an empty file', name: 'empty.png', type: 'image/png', content: Buffer.alloc(0) },
      {
        what: 'a PNG cut after its header',
        name: 'broken.png',
        type: 'image/png',
        content: png.subarray(0, 40),
      },
      {
        what: 'a PNG with a damaged body',
        name: 'damaged.png',
        type: 'image/png',
        content: Buffer.concat([png.subarray(0, 33), Buffer.alloc(200, 0xaa)]),
      },
      { what: 'a file over the limit', name: 'big.png', type: 'image/png', content: big },
      { what: 'a name with a NUL', name: 'photo\u0000.png', type: 'image/png', content: png },
      {
        what: 'a 600-character name',
        name: `${'p'.repeat(600)}.png`,
        type: 'image/png',
        content: png,
      },
      {
        what: 'a name with SQL and a folder',
        name: "x'); drop table attachments;--/.png",
        type: 'image/png',
        content: png,
      },
    ];
    const filesBefore = readdirSync(probe.app.config.uploads!.dir, { recursive: true }).length;
    const before = await fingerprint(t.db);
    const problems: string[] = [];
    for (const c of cases) {
      const body = multipart({}, { name: c.name, type: c.type, content: c.content });
      const answer = await probe.send('POST', url, {
        payload: body.payload,
        headers: body.headers,
      });
      problems.push(...judge(c.what, answer));
      if (answer.status < 400) problems.push(`${c.what}: accepted (${answer.status})`);
    }
    const cut = await probe.send('POST', url, {
      payload: Buffer.from(
        '--x\r\nContent-Disposition: form-data; name="file"; filename="a.png"\r\n\r\n',
      ),
      headers: { 'content-type': 'multipart/form-data; boundary=x' },
    });
    problems.push(...judge('a multipart body cut short', cut));
    if (cut.status < 400) problems.push(`a multipart body cut short: got ${cut.status}`);
    const noBoundary = await probe.send('POST', url, {
      payload: Buffer.from('garbage'),
      headers: { 'content-type': 'multipart/form-data' },
    });
    problems.push(...judge('multipart without a boundary', noBoundary));
    if (noBoundary.status < 400)
      problems.push(`multipart without a boundary: got ${noBoundary.status}`);
    expect(problems).toEqual([]);
    expect(await fingerprint(t.db)).toBe(before);
    expect(readdirSync(probe.app.config.uploads!.dir, { recursive: true }).length).toBe(
      filesBefore,
    );
  });
});

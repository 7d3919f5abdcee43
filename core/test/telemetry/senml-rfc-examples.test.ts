import { describe, expect, it } from 'vitest';
import { type ResolvedSenmlRecord, resolveSenmlPack } from '../../src/index.js';

// The examples printed in RFC 8428, section 5.1, resolved by the generic SenML resolver.
const NOW = 1_700_000_000;

function resolved(pack: unknown, now = NOW): ResolvedSenmlRecord[] {
  const result = resolveSenmlPack(pack, { nowSeconds: now, limits: { maxAgeSeconds: 1e10 } });
  if (!result.ok) throw new Error(result.reason);
  expect(result.rejected).toEqual([]);
  return result.records;
}

describe('RFC 8428 examples', () => {
  it('§5.1.1 single datapoint: a reading "now"', () => {
    const text = '[{"n":"urn:dev:ow:10e2073a01080063","u":"Cel","v":23.1}]';
    expect(resolved(text)).toEqual([
      { index: 0, n: 'urn:dev:ow:10e2073a01080063', u: 'Cel', v: 23.1, t: NOW },
    ]);
  });

  it('§5.1.2 multiple datapoints: base name joined to each name, both "now"', () => {
    const text =
      '[{"bn":"urn:dev:ow:10e2073a01080063:","n":"voltage","u":"V","v":120.1},{"n":"current","u":"A","v":1.2}]';
    expect(resolved(text)).toEqual([
      { index: 0, n: 'urn:dev:ow:10e2073a01080063:voltage', u: 'V', v: 120.1, t: NOW },
      { index: 1, n: 'urn:dev:ow:10e2073a01080063:current', u: 'A', v: 1.2, t: NOW },
    ]);
  });

  it('§5.1.2 multiple datapoints with base time, base unit, bver 5 and relative t', () => {
    const pack = [
      {
        bn: 'urn:dev:ow:10e2073a0108006:',
        bt: 1.276020076001e9,
        bu: 'A',
        bver: 5,
        n: 'voltage',
        u: 'V',
        v: 120.1,
      },
      { n: 'current', t: -5, v: 1.2 },
      { n: 'current', t: -4, v: 1.3 },
      { n: 'current', t: -3, v: 1.4 },
      { n: 'current', t: -2, v: 1.5 },
      { n: 'current', t: -1, v: 1.6 },
      { n: 'current', v: 1.7 },
    ];
    const records = resolved(pack);
    expect(records[0]).toMatchObject({ n: 'urn:dev:ow:10e2073a0108006:voltage', u: 'V', v: 120.1 });
    expect(records[0]?.t).toBeCloseTo(1.276020076001e9, 6);
    const currents = records.slice(1);
    expect(currents.map((r) => r.v)).toEqual([1.2, 1.3, 1.4, 1.5, 1.6, 1.7]);
    expect(currents.every((r) => r.u === 'A' && r.n === 'urn:dev:ow:10e2073a0108006:current')).toBe(
      true,
    );
    // Tue Jun 8 18:01:16.001 UTC 2010 and each second for the previous 5 seconds
    currents.forEach((r, i) => expect(r.t).toBeCloseTo(1.276020071001e9 + i, 6));
    expect(new Date((records[6]?.t ?? 0) * 1000).toISOString()).toBe('2010-06-08T18:01:16.001Z');
  });

  const multipleMeasurements = [
    { bn: 'urn:dev:ow:10e2073a01080063', bt: 1.320067464e9, bu: '%RH', v: 20 },
    { u: 'lon', v: 24.30621 },
    { u: 'lat', v: 60.07965 },
    { t: 60, v: 20.3 },
    { u: 'lon', t: 60, v: 24.30622 },
    { u: 'lat', t: 60, v: 60.07965 },
    { t: 120, v: 20.7 },
    { u: 'lon', t: 120, v: 24.30623 },
    { u: 'lat', t: 120, v: 60.07966 },
    { u: '%EL', t: 150, v: 98 },
    { t: 180, v: 21.2 },
    { u: 'lon', t: 180, v: 24.30628 },
    { u: 'lat', t: 180, v: 60.07967 },
  ];

  // §5.1.4 prints the resolved form of the §5.1.3 pack.
  const resolvedData = [
    { n: 'urn:dev:ow:10e2073a01080063', u: '%RH', t: 1.320067464e9, v: 20 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lon', t: 1.320067464e9, v: 24.30621 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lat', t: 1.320067464e9, v: 60.07965 },
    { n: 'urn:dev:ow:10e2073a01080063', u: '%RH', t: 1.320067524e9, v: 20.3 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lon', t: 1.320067524e9, v: 24.30622 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lat', t: 1.320067524e9, v: 60.07965 },
    { n: 'urn:dev:ow:10e2073a01080063', u: '%RH', t: 1.320067584e9, v: 20.7 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lon', t: 1.320067584e9, v: 24.30623 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lat', t: 1.320067584e9, v: 60.07966 },
    { n: 'urn:dev:ow:10e2073a01080063', u: '%EL', t: 1.320067614e9, v: 98 },
    { n: 'urn:dev:ow:10e2073a01080063', u: '%RH', t: 1.320067644e9, v: 21.2 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lon', t: 1.320067644e9, v: 24.30628 },
    { n: 'urn:dev:ow:10e2073a01080063', u: 'lat', t: 1.320067644e9, v: 60.07967 },
  ];

  it('§5.1.3 multiple measurements resolve to exactly the records printed in §5.1.4 resolved data', () => {
    const records = resolved(multipleMeasurements).map(({ index: _index, ...rest }) => rest);
    expect(records).toEqual(resolvedData);
  });

  it('§5.1.4 resolved data is a fixed point: resolving it again changes nothing', () => {
    const records = resolved(resolvedData).map(({ index: _index, ...rest }) => rest);
    expect(records).toEqual(resolvedData);
  });

  it('§5.1.5 multiple data types: v, vs, vb and vd', () => {
    const pack = [
      { bn: 'urn:dev:ow:10e2073a01080063:', n: 'temp', u: 'Cel', v: 23.1 },
      { n: 'label', vs: 'Machine Room' },
      { n: 'open', vb: false },
      { n: 'nfc-reader', vd: 'aGkgCg' },
    ];
    expect(resolved(pack)).toEqual([
      { index: 0, n: 'urn:dev:ow:10e2073a01080063:temp', u: 'Cel', v: 23.1, t: NOW },
      { index: 1, n: 'urn:dev:ow:10e2073a01080063:label', vs: 'Machine Room', t: NOW },
      { index: 2, n: 'urn:dev:ow:10e2073a01080063:open', vb: false, t: NOW },
      { index: 3, n: 'urn:dev:ow:10e2073a01080063:nfc-reader', vd: 'aGkgCg', t: NOW },
    ]);
  });

  it("§5.1.6 collection of resources: the last record keeps the 3rd record's base name and the 1st record's base time", () => {
    const pack = [
      { bn: '2001:db8::2/', bt: 1.320078429e9, n: 'temperature', u: 'Cel', v: 25.2 },
      { n: 'humidity', u: '%RH', v: 30 },
      { bn: '2001:db8::1/', n: 'temperature', u: 'Cel', v: 12.3 },
      { n: 'humidity', u: '%RH', v: 67 },
    ];
    const records = resolved(pack);
    expect(records.map((r) => r.n)).toEqual([
      '2001:db8::2/temperature',
      '2001:db8::2/humidity',
      '2001:db8::1/temperature',
      '2001:db8::1/humidity',
    ]);
    expect(records.every((r) => r.t === 1.320078429e9)).toBe(true);
  });

  it('§5.1.7 setting an actuator: a record holding only bn is a base-only record', () => {
    const pack = [
      { bn: 'urn:dev:ow:10e2073a01080063:' },
      { n: 'temp', u: 'Cel', v: 23.1 },
      { n: 'heat', u: '/', v: 1 },
      { n: 'fan', u: '/', v: 0 },
    ];
    const result = resolveSenmlPack(pack, { nowSeconds: NOW });
    expect(result.ok && result.baseOnlyRecords).toBe(1);
    expect(result.ok && result.records.map((r) => [r.n, r.u, r.v])).toEqual([
      ['urn:dev:ow:10e2073a01080063:temp', 'Cel', 23.1],
      ['urn:dev:ow:10e2073a01080063:heat', '/', 1],
      ['urn:dev:ow:10e2073a01080063:fan', '/', 0],
    ]);
  });

  it('§5.1.7 synchronised lights off: t of 0.1 s is 100 ms after the base time', () => {
    const pack = [
      { bt: 1.320078429e9, bu: '/', n: '2001:db8::3', v: 0.5 },
      { n: '2001:db8::4', v: 0.5 },
      { n: '2001:db8::3', t: 0.1, v: 0 },
      { n: '2001:db8::4', t: 0.1, v: 0 },
    ];
    const records = resolved(pack, 1320078429);
    expect(records.map((r) => r.t - 1.320078429e9).map((d) => Math.round(d * 1000))).toEqual([
      0, 0, 100, 100,
    ]);
  });
});

describe('RFC 8428 rules beyond the examples', () => {
  it('§4.5.3: times below 2^28 are relative to now, at or above are absolute', () => {
    const records = resolved([
      { n: 'a', v: 1, t: -60 },
      { n: 'b', v: 1, t: 2 ** 28 - 1 },
      { n: 'c', v: 1, t: 2 ** 28 },
    ]);
    expect(records.map((r) => r.t)).toEqual([NOW - 60, NOW + 2 ** 28 - 1, 2 ** 28]);
  });

  it('§4.5.3: the sum of bt and t decides, not t alone', () => {
    const records = resolved([{ bt: -300, n: 'a', v: 1, t: 10 }]);
    expect(records[0]?.t).toBe(NOW - 290);
  });

  it('§4.3: base value and base sum are added to v and s', () => {
    const records = resolved([
      { bn: 'dev:', bv: 100, bs: 1000, n: 'a', v: 2.5 },
      { n: 'b', s: 7 },
    ]);
    expect(records[0]?.v).toBe(102.5);
    expect(records[1]?.s).toBe(1007);
  });

  it('§4.4: a newer version refuses the whole pack', () => {
    const result = resolveSenmlPack([{ bver: 11, n: 'a', v: 1 }], { nowSeconds: NOW });
    expect(result).toEqual({
      ok: false,
      reason: 'SenML version 11 is newer than the supported version 10',
    });
  });

  it('§4.4: an unknown must-understand field (ending in _) refuses the whole pack', () => {
    const result = resolveSenmlPack([{ n: 'a', v: 1, custom_: 3 }], { nowSeconds: NOW });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.reason).toContain('"custom_"');
  });

  it('§4.5.1: names must start with a letter or digit and use only the allowed characters', () => {
    const result = resolveSenmlPack(
      [
        { n: '-lead', v: 1 },
        { n: 'has space', v: 1 },
        { n: 'ok:name/x_y.z-1', v: 1 },
      ],
      { nowSeconds: NOW },
    );
    expect(result.ok && result.records.map((r) => r.n)).toEqual(['ok:name/x_y.z-1']);
    expect(result.ok && result.rejected.map((r) => r.index)).toEqual([0, 1]);
  });

  it('a bad base name rejects the records that inherit it, not the whole pack', () => {
    const result = resolveSenmlPack(
      [
        { bn: 42, n: 'a', v: 1 },
        { n: 'b', v: 2 },
        { bn: 'good:', n: 'c', v: 3 },
      ],
      { nowSeconds: NOW },
    );
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.records.map((r) => r.n)).toEqual(['good:c']);
    expect(result.rejected[1]?.reason).toBe('the base name set in record 1 is invalid');
  });

  it('a record with two values or none is rejected with a reason', () => {
    const result = resolveSenmlPack([{ n: 'a', v: 1, vb: true }, { n: 'b' }], { nowSeconds: NOW });
    expect(result.ok && result.rejected.map((r) => r.reason)).toEqual([
      'record has more than one value (v, vb)',
      'record has no value (v, vs, vb, vd or s)',
    ]);
  });
});

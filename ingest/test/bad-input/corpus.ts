/**
 * The bad-input corpus for ingest: malformed SenML payloads (sent as QoS 1 publishes by a real
 * MQTT client) and malformed MQTT packets (written byte by byte on a raw TCP socket). Each
 * payload case says what the broker must do with it: refuse the whole pack with a reason, or
 * keep its good records and give each bad record a reason.
 */

/** What a payload is built from: the sending gateway and a time slot of its own. */
export interface CaseContext {
  gatewayId: string;
  /** `urn:dev:wellkept:<gatewayId>:` */
  bn: string;
  /** Epoch seconds, unique to the case (so good records of different cases never collide). */
  t: number;
  /** The receiver's clock, epoch seconds, roughly. */
  now: number;
}

export type PayloadExpectation =
  /** The whole pack is refused; one reject row with a reason matching this. */
  | { packError: RegExp }
  /** Some records stored, the others refused, one reason each (in record order). */
  | { stored: number; rejects: RegExp[] };

export interface PayloadCase {
  family: string;
  what: string;
  payload: (ctx: CaseContext) => string | Buffer;
  expect: PayloadExpectation;
}

const cases: PayloadCase[] = [];
const add = (
  family: string,
  what: string,
  payload: PayloadCase['payload'],
  expect: PayloadExpectation,
) => cases.push({ family, what, payload, expect });
const json = (value: unknown) => JSON.stringify(value);
/** One good record (a battery voltage) at the case's time. */
const good = (ctx: CaseContext, extra: Record<string, unknown> = {}) => ({
  bn: ctx.bn,
  bt: ctx.t,
  n: 'battery/voltage',
  u: 'V',
  v: 25.5,
  ...extra,
});
/** A pack of one good record followed by `bad` (so the good one must be kept). */
const withGood = (ctx: CaseContext, bad: Record<string, unknown>[]) =>
  json([good(ctx), ...bad.map((b, i) => ({ t: i + 1, ...b }))]);

// Not JSON --------------------------------------------------------------------------------
const NOT_JSON = /pack is not valid JSON/;
for (const text of [
  '',
  ' ',
  '\n',
  'hello',
  'online',
  '{',
  '[',
  ']',
  '[{]',
  '[{"n":"battery/voltage",}]',
  "[{'n':'battery/voltage'}]",
  '[{n:"battery/voltage"}]',
  '[{"n":"battery/voltage","v":NaN}]',
  '[{"n":"battery/voltage","v":Infinity}]',
  '[{"n":"battery/voltage","v":-Infinity}]',
  '[{"n":"battery/voltage","v":0x1A}]',
  '[{"n":"battery/voltage","v":.5}]',
  '[{"n":"battery/voltage","v":01}]',
  '[{"n":"battery/voltage","v":+1}]',
  '[{"n":"battery/voltage","v":1.}]',
  '[{"n":"battery/voltage","v":undefined}]',
  '[{"n":"battery/voltage"} /* comment */]',
  '// comment\n[]',
  '[1,2,',
  '[{"n":"a"}]]',
  '[]x',
  '"unterminated',
  '[{"n":"tab\there"}]',
  '<senml><e n="battery/voltage" v="25"/></senml>',
  'time,battery/voltage\n2026-01-01T00:00:00Z,25.1',
  'n=battery/voltage&v=25',
  '[{"n":"battery/voltage","v":1}]\u0000',
  '\u0000\u0000\u0000\u0000',
  'null null',
  '{"a":1}{"b":2}',
]) {
  add('not JSON', JSON.stringify(text.slice(0, 40)), () => text, { packError: NOT_JSON });
}
// CBOR-looking and random binary that happens to be valid UTF-8 but not JSON.
// A byte-order mark is dropped by the UTF-8 decoder: what follows is an ordinary (empty) pack.
add('not JSON', 'a byte-order mark before an empty pack', () => '\uFEFF[]', {
  stored: 0,
  rejects: [],
});
add('not JSON', 'CBOR-like bytes', () => Buffer.from([0x81, 0xa2, 0x00, 0x61, 0x61]), {
  packError: /not valid (JSON|UTF-8)/,
});
add('not JSON', 'gzip magic', () => Buffer.from([0x1f, 0x8b, 0x08, 0x00, 0x00]), {
  packError: /not valid (JSON|UTF-8)/,
});
add('not JSON', 'all byte values 0–127', () => Buffer.from([...Array(128).keys()]), {
  packError: NOT_JSON,
});

// Invalid UTF-8 ---------------------------------------------------------------------------
const NOT_UTF8 = /pack is not valid UTF-8 text/;
for (const [what, bytes] of [
  ['lone 0xFF', [0xff]],
  ['lone continuation byte', [0x80]],
  ['bad second byte', [0xc3, 0x28]],
  ['overlong slash', [0xc0, 0xaf]],
  ['overlong NUL', [0xc0, 0x80]],
  ['UTF-16 surrogate encoded', [0xed, 0xa0, 0x80]],
  ['beyond U+10FFFF', [0xf4, 0x90, 0x80, 0x80]],
  ['truncated 3-byte sequence', [0xe2, 0x82]],
  ['truncated 4-byte sequence', [0xf0, 0x9f, 0x98]],
  ['0xFE 0xFF (UTF-16 mark)', [0xfe, 0xff]],
] as const) {
  add(
    'invalid UTF-8',
    `${what} inside a name`,
    (ctx) =>
      Buffer.concat([
        Buffer.from(`[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"battery/volt`),
        Buffer.from(bytes),
        Buffer.from('age","u":"V","v":25}]'),
      ]),
    { packError: NOT_UTF8 },
  );
  add('invalid UTF-8', `${what} alone`, () => Buffer.from(bytes), { packError: NOT_UTF8 });
}
add('invalid UTF-8', 'UTF-16LE text', () => Buffer.from('[{"n":"x"}]', 'utf16le'), {
  packError: NOT_JSON,
});

// Not an array of records -----------------------------------------------------------------
const NOT_ARRAY = /pack is not a JSON array of records/;
for (const text of ['{}', '1', '-0', '"pack"', 'null', 'true', '1e400', '{"0":{}}']) {
  add('not an array', text, () => text, { packError: NOT_ARRAY });
}
add('not an array', 'a single record object', (ctx) => json(good(ctx)), { packError: NOT_ARRAY });
for (const [text, reason] of [
  ['[1]', /record 1 is 1, not an object/],
  ['[null]', /record 1 is null, not an object/],
  ['[[]]', /record 1 is an array, not an object/],
  ['["battery/voltage"]', /record 1 is "battery\/voltage", not an object/],
  ['[true]', /record 1 is true, not an object/],
  ['[{}, 2]', /record 2 is 2, not an object/],
] as const) {
  add('not an array', text, () => text, { packError: reason });
}

// Deep nesting ----------------------------------------------------------------------------
for (const depth of [64, 1000, 20_000]) {
  add('deep nesting', `${depth} nested arrays`, () => '['.repeat(depth) + ']'.repeat(depth), {
    packError: /record 1 is an array, not an object/,
  });
  add(
    'deep nesting',
    `a value nested ${depth} objects deep`,
    (ctx) =>
      `[${json(good(ctx))},{"n":"battery/current","u":"A","t":1,"v":${nestedObject(depth)}}]`,
    { stored: 1, rejects: [/v must be a finite number, got an object/] },
  );
  add(
    'deep nesting',
    `an unknown field nested ${depth} arrays deep`,
    (ctx) => `[${json(good(ctx)).slice(0, -1)},"extra":${nestedArray(depth)}}]`,
    { stored: 1, rejects: [] },
  );
}
add('deep nesting', '30,000 unclosed arrays', () => '['.repeat(30_000), {
  packError: NOT_JSON,
});

// Huge arrays -----------------------------------------------------------------------------
add(
  'huge arrays',
  '5,001 records (over the limit)',
  (ctx) => json([{ bn: ctx.bn }, ...Array.from({ length: 5000 }, (_, i) => ({ n: 'x', t: i }))]),
  { packError: /pack has 5001 records, more than the limit of 5000/ },
);
add('huge arrays', '30,000 numbers', () => json(Array.from({ length: 30_000 }, () => 0)), {
  packError: /more than the limit of 5000/,
});
add('huge arrays', '4,000 empty objects', () => json(Array.from({ length: 4000 }, () => ({}))), {
  stored: 0,
  rejects: Array.from({ length: 4000 }, () => /record has no name/),
});
add(
  'huge arrays',
  'a value that is an array of 10,000 numbers',
  (ctx) =>
    withGood(ctx, [{ n: 'battery/current', u: 'A', v: Array.from({ length: 10_000 }, () => 1) }]),
  { stored: 1, rejects: [/v must be a finite number, got an array/] },
);
add(
  'huge arrays',
  '2,000 good records of one pack, all kept',
  (ctx) =>
    json([
      { bn: ctx.bn, bt: ctx.t - 2000, bu: 'V' },
      ...Array.from({ length: 2000 }, (_, i) => ({ n: 'battery/voltage', t: i, v: 25 })),
    ]),
  { stored: 2000, rejects: [] },
);

// NaN, Infinity and numbers as strings ----------------------------------------------------
for (const text of ['NaN', 'Infinity', '-Infinity', '1e309', '25.5', '0x1A', '', ' 25 ', 'null']) {
  add(
    'numbers as strings',
    `v "${text}"`,
    (ctx) => withGood(ctx, [{ n: 'battery/current', u: 'A', v: text }]),
    {
      stored: 1,
      rejects: [/v must be a finite number, got "/],
    },
  );
}
for (const field of ['bt', 'bv', 'bs', 't', 's'] as const) {
  add(
    'numbers as strings',
    `${field} "NaN"`,
    (ctx) => withGood(ctx, [{ n: 'battery/current', u: 'A', v: 1, [field]: 'NaN' }]),
    { stored: 1, rejects: [new RegExp(`${field} must be a finite number, got "NaN"`)] },
  );
}
add(
  'numbers as strings',
  '1e309 (JSON overflow to Infinity)',
  (ctx) => `[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"battery/current","u":"A","v":1e309}]`,
  { stored: 0, rejects: [/v must be a finite number, got a non-finite number/] },
);
add(
  'numbers as strings',
  'bt 1e309',
  (ctx) => `[{"bn":"${ctx.bn}","bt":1e309,"n":"battery/current","u":"A","v":1}]`,
  { stored: 0, rejects: [/bt must be a finite number/] },
);
add(
  'numbers as strings',
  'bv + v overflows',
  (ctx) => json([{ bn: ctx.bn, bt: ctx.t, bv: 1.7e308, n: 'battery/current', u: 'A', v: 1.7e308 }]),
  { stored: 0, rejects: [/base value plus v is not a finite number/] },
);
for (const value of [true, null, {}, [25]]) {
  add(
    'wrong types',
    `v ${json(value)}`,
    (ctx) => withGood(ctx, [{ n: 'battery/current', u: 'A', v: value }]),
    {
      stored: 1,
      rejects: [/v must be a finite number/],
    },
  );
}
for (const value of ['true', 1, 0, null]) {
  add(
    'wrong types',
    `vb ${json(value)}`,
    (ctx) => withGood(ctx, [{ n: 'pump/well/running', vb: value }]),
    { stored: 1, rejects: [/vb must be true or false/] },
  );
}
for (const value of [1, true, null, ['bulk']]) {
  add(
    'wrong types',
    `vs ${json(value)}`,
    (ctx) => withGood(ctx, [{ n: 'controller/stage', vs: value }]),
    { stored: 1, rejects: [/vs must be a string/] },
  );
}
for (const value of [42, null, true, { n: 'x' }]) {
  add('wrong types', `n ${json(value)}`, (ctx) => withGood(ctx, [{ n: value, u: 'A', v: 1 }]), {
    stored: 1,
    rejects: [/n must be a string/],
  });
  add(
    'wrong types',
    `bn ${json(value)}`,
    (ctx) => withGood(ctx, [{ bn: value, n: 'battery/current', u: 'A', v: 1 }]),
    {
      stored: 1,
      rejects: [/bn must be a string/],
    },
  );
  add(
    'wrong types',
    `u ${json(value)}`,
    (ctx) => withGood(ctx, [{ n: 'battery/current', u: value, v: 1 }]),
    {
      stored: 1,
      rejects: [/u must be a string/],
    },
  );
}

// Wrong units -----------------------------------------------------------------------------
for (const [name, unit, v] of [
  ['battery/voltage', 'mV', 25_000],
  ['battery/voltage', 'v', 25],
  ['battery/voltage', 'A', 25],
  ['battery/voltage', '', 25],
  ['battery/voltage', 'V ', 25],
  ['battery/current', 'mA', 500],
  ['battery/temperature', 'degC', 20],
  ['battery/temperature', 'K', 293],
  ['battery/temperature', 'Far', 70],
  ['pv/roof/voltage', 'kV', 0.07],
  ['pump/well/current', 'W', 100],
  ['pump/well/flow', 'l/s', 1],
  ['pump/well/flow', 'm3/h', 1],
  ['tank/main/level', 'cm', 180],
  ['tank/main/level', '%', 80],
  ['tank/main/level', 'ft', 6],
  ['pressure/house', 'kPa', 300],
  ['pressure/house', 'bar', 3],
  ['pressure/house', 'psi', 40],
  ['well/level', 'km', 0.05],
] as const) {
  add(
    'wrong units',
    `${name} in ${json(unit)}`,
    (ctx) => withGood(ctx, [{ n: name, u: unit, v }]),
    {
      stored: 1,
      rejects: [new RegExp(`${escape(name)}: unit "${escape(unit)}" is not the expected`)],
    },
  );
}
for (const name of ['battery/voltage', 'tank/main/level', 'pressure/house']) {
  add('wrong units', `${name} with no unit`, (ctx) => withGood(ctx, [{ n: name, v: 1 }]), {
    stored: 1,
    rejects: [new RegExp(`${escape(name)}: unit missing, expected`)],
  });
}
add(
  'wrong units',
  'wrong base unit for the rest of the pack',
  (ctx) =>
    json([
      good(ctx),
      { bu: 'mV', n: 'battery/voltage', t: 1, v: 25 },
      { n: 'pv/roof/voltage', t: 1, v: 30 },
    ]),
  { stored: 1, rejects: [/unit "mV" is not the expected V/, /unit "mV" is not the expected V/] },
);

// Duplicated names ------------------------------------------------------------------------
add(
  'duplicated names',
  'the same name and time twice',
  (ctx) => json([good(ctx), good(ctx, { v: 26 })]),
  { stored: 1, rejects: [/battery\/voltage: repeats record 1 \(same name and time\)/] },
);
add('duplicated names', 'three copies', (ctx) => json([good(ctx), good(ctx), good(ctx)]), {
  stored: 1,
  rejects: [/repeats record 1/, /repeats record 1/],
});
add(
  'duplicated names',
  'same time written two ways (bt+t and bt)',
  (ctx) =>
    json([good(ctx), { bn: ctx.bn, bt: ctx.t - 10, n: 'battery/voltage', u: 'V', t: 10, v: 1 }]),
  { stored: 1, rejects: [/repeats record 1/] },
);
add(
  'duplicated names',
  'duplicate JSON keys in one record (the last wins)',
  (ctx) =>
    `[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"battery/voltage","n":"pump/well/speed","u":"V","v":25}]`,
  { stored: 0, rejects: [/pump\/well\/speed: not a Wellkept measurement name/] },
);
add(
  'duplicated names',
  'duplicate value keys (v twice, the last out of range)',
  (ctx) => `[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"battery/voltage","u":"V","v":25,"v":912}]`,
  { stored: 0, rejects: [/value 912 V outside 0–40 V/] },
);

// Times far in the past or the future -----------------------------------------------------
for (const [what, bt, reason] of [
  ['year 2001', 1_000_000_000, /in the past/],
  ['the first relative-time boundary (2^28)', 2 ** 28, /in the past/],
  ['31 days ago', -31 * 86_400, /more than 30 days in the past/],
  ['a year ago', -365 * 86_400, /in the past/],
  ['-1e300 (relative)', -1e300, /in the past/],
  ['10 minutes ahead', 600, /more than 5 minutes in the future/],
  ['a day ahead', 86_400, /in the future/],
  ['year 2100', 4_102_444_800, /in the future/],
  ['1e300', 1e300, /in the future/],
  ['Number.MAX_VALUE', Number.MAX_VALUE, /in the future/],
] as const) {
  add(
    'times',
    what,
    // A negative bt counts back from the receiver's clock (RFC 8428 §4.5.3).
    (ctx) =>
      withGood(ctx, [
        { bt: bt >= 2 ** 28 || bt < 0 ? bt : ctx.now + bt, n: 'battery/current', u: 'A', v: 1 },
      ]),
    { stored: 1, rejects: [reason] },
  );
}
add(
  'times',
  'ms instead of seconds',
  (ctx) => withGood(ctx, [{ bt: ctx.now * 1000, n: 'battery/current', u: 'A', v: 1 }]),
  { stored: 1, rejects: [/in the future/] },
);
add(
  'times',
  'ut negative',
  (ctx) => withGood(ctx, [{ n: 'battery/current', u: 'A', v: 1, ut: -5 }]),
  { stored: 1, rejects: [/ut must be a non-negative number/] },
);
add(
  'times',
  'time as an ISO string',
  (ctx) => withGood(ctx, [{ n: 'battery/current', u: 'A', v: 1, t: '2026-01-01T00:00:00Z' }]),
  { stored: 1, rejects: [/t must be a finite number, got "2026-01-01T00:00:00Z"/] },
);

// Names, gateways, values and ranges ------------------------------------------------------
for (const name of [
  'pump/well/speed',
  '../../etc/passwd',
  'battery',
  'battery/voltage/extra',
  'BATTERY/VOLTAGE',
  'tank//level',
  'pv/roof',
]) {
  add('names', `unknown name ${name}`, (ctx) => withGood(ctx, [{ n: name, u: 'V', v: 1 }]), {
    stored: 1,
    rejects: [new RegExp(`not a Wellkept measurement name`)],
  });
}
for (const name of [
  'battery voltage',
  'battery/voltage\u0000',
  'battery/völtage',
  'battery/voltage;drop table readings',
  '\u202Ebattery',
]) {
  add('names', `characters ${json(name)}`, (ctx) => withGood(ctx, [{ n: name, u: 'V', v: 1 }]), {
    stored: 1,
    rejects: [/has characters outside A–Z a–z 0–9/],
  });
}
add(
  'names',
  'a 300-character name',
  (ctx) => withGood(ctx, [{ n: 'x'.repeat(300), u: 'V', v: 1 }]),
  {
    stored: 1,
    rejects: [/more than 200/],
  },
);
add('names', 'no name at all', () => json([{ u: 'V', v: 1 }]), {
  stored: 0,
  rejects: [/record has no name/],
});
add(
  'names',
  'no base name',
  (ctx) => json([good(ctx), { bn: '', n: 'battery/voltage', u: 'V', v: 1 }]),
  {
    stored: 1,
    rejects: [/does not start with urn:dev:wellkept:/],
  },
);
add(
  'names',
  "another gateway's base name",
  (ctx) => withGood(ctx, [{ bn: 'urn:dev:wellkept:gw-9999:', n: 'battery/current', u: 'A', v: 1 }]),
  {
    stored: 1,
    rejects: [/belongs to gateway gw-9999, not /],
  },
);
add(
  'names',
  'a URN of another scheme',
  (ctx) =>
    withGood(ctx, [{ bn: 'urn:dev:mac:0024befffe804ff1:', n: 'battery/current', u: 'A', v: 1 }]),
  {
    stored: 1,
    rejects: [/does not start with urn:dev:wellkept:/],
  },
);
for (const [name, unit, v, reason] of [
  ['battery/voltage', 'V', 912, /value 912 V outside 0–40 V/],
  ['battery/voltage', 'V', -1, /outside/],
  ['battery/current', 'A', 5000, /outside -2000–2000/],
  ['battery/temperature', 'Cel', 200, /outside -50–90 °C/],
  ['pv/roof/voltage', 'V', 1000, /outside/],
  ['pv/roof/current', 'A', -50, /outside/],
  ['pump/well/current', 'A', 500, /outside/],
  ['pump/well/flow', 'm3/s', 5, /outside/],
  ['tank/main/level', 'm', 99, /outside/],
  ['pressure/house', 'Pa', -200_000, /outside/],
  ['well/level', 'm', 1e9, /outside/],
  ['battery/voltage', 'V', 5e-324, null],
] as const) {
  if (reason === null) {
    add(
      'ranges',
      `${name} ${v} (tiny but inside)`,
      (ctx) => withGood(ctx, [{ n: name, u: unit, v }]),
      {
        stored: 2,
        rejects: [],
      },
    );
  } else {
    add('ranges', `${name} ${v}`, (ctx) => withGood(ctx, [{ n: name, u: unit, v }]), {
      stored: 1,
      rejects: [reason],
    });
  }
}
for (const [what, record, reason] of [
  [
    'a switch given a number',
    { n: 'pump/well/running', v: 1 },
    /needs true or false \(vb\), got a number \(v\)/,
  ],
  [
    'a number given a boolean',
    { n: 'battery/current', vb: true },
    /needs a number \(v\), got a boolean/,
  ],
  ['a stage given a number', { n: 'controller/stage', u: 'V', v: 1 }, /needs a string \(vs\)/],
  ['an unknown stage', { n: 'controller/stage', vs: 'boost' }, /"boost" is not a stage/],
  ['a stage in capitals', { n: 'controller/stage', vs: 'BULK' }, /is not a stage/],
  [
    'a 65-character string',
    { n: 'controller/stage', vs: 'b'.repeat(65) },
    /vs is 65 characters, more than 64/,
  ],
  ['two values', { n: 'battery/current', u: 'A', v: 1, vs: 'x' }, /more than one value \(v, vs\)/],
  ['no value', { n: 'battery/current', u: 'A' }, /record has no value/],
  ['only a sum', { n: 'battery/current', u: 'A', s: 1 }, /needs a number \(v\), got only a sum/],
  ['data value', { n: 'battery/current', vd: 'AAEC' }, /needs a number \(v\), got data \(vd\)/],
] as const) {
  add('values', what, (ctx) => withGood(ctx, [record]), { stored: 1, rejects: [reason] });
}
add('pack fields', 'a must-understand field', (ctx) => json([good(ctx, { x_: 1 })]), {
  packError: /must-understand field "x_"/,
});
add('pack fields', 'a newer SenML version', (ctx) => json([good(ctx, { bver: 11 })]), {
  packError: /SenML version 11 is newer/,
});
add('pack fields', 'bver "10"', (ctx) => json([good(ctx, { bver: '10' })]), {
  packError: /bver must be a positive integer/,
});
add(
  'pack fields',
  'a broken base name poisons later records',
  (ctx) =>
    json([
      good(ctx),
      { bn: 7, n: 'battery/current', u: 'A', v: 1 },
      { n: 'battery/current', u: 'A', t: 1, v: 2 },
    ]),
  { stored: 1, rejects: [/bn must be a string/, /the base name set in record 2 is invalid/] },
);
add('pack fields', 'an empty pack', () => '[]', { stored: 0, rejects: [] });
add('pack fields', 'only base fields', (ctx) => json([{ bn: ctx.bn, bt: ctx.t }]), {
  stored: 0,
  rejects: [],
});
add(
  'pack fields',
  'prototype keys',
  (ctx) =>
    `[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"battery/voltage","u":"V","v":25,"__proto__":{"v":999},"constructor":1}]`,
  { packError: /must-understand field "__proto__"/ },
);
add(
  'pack fields',
  'SQL in a string value',
  (ctx) => withGood(ctx, [{ n: 'controller/stage', vs: "bulk'); drop table readings;--" }]),
  { stored: 1, rejects: [/is not a stage/] },
);
add(
  'pack fields',
  'NUL and control characters in a string value',
  (ctx) => withGood(ctx, [{ n: 'controller/stage', vs: 'bu\u0000lk\u0007\u001b[2J' }]),
  { stored: 1, rejects: [/is not a stage/] },
);
add(
  'pack fields',
  'lone surrogate in a string value',
  (ctx) => `[{"bn":"${ctx.bn}","bt":${ctx.t},"n":"controller/stage","vs":"\\ud800"}]`,
  { stored: 0, rejects: [/is not a stage/] },
);

export const PAYLOAD_CASES: readonly PayloadCase[] = cases;

/** Built as text: JSON.stringify itself recurses and would overflow the stack. */
function nestedObject(depth: number): string {
  return `${'{"a":'.repeat(depth)}1${'}'.repeat(depth)}`;
}

function nestedArray(depth: number): string {
  return `${'['.repeat(depth)}${']'.repeat(depth)}`;
}

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
}

// ---------------------------------------------------------------------------------------------
// Wrong topics (published by an authenticated gateway: the connection is closed, nothing kept)

export const WRONG_TOPICS: readonly ((gatewayId: string) => string)[] = [
  () => 'gateways/gw-someone-else/senml',
  (id) => `gateways/${id}/rejects`,
  (id) => `gateways/${id}/senml/extra`,
  (id) => `gateways/${id}/SENML`,
  (id) => `gateways/${id}/`,
  (id) => `gateways/${id}`,
  (id) => `/gateways/${id}/senml`,
  (id) => `gateways/${id.toUpperCase()}/senml`,
  () => '$SYS/broker/clients',
  () => 'senml',
  (id) => `gateways/${id}/senml\u0000`,
  (id) => `gateways/${id}/${'x'.repeat(2000)}`,
];

// ---------------------------------------------------------------------------------------------
// Raw MQTT packets on a TCP socket

/** An MQTT string: two-byte length, then the bytes (MQTT 3.1.1 §1.5.3). */
export function mqttString(text: string | Buffer): Buffer {
  const bytes = typeof text === 'string' ? Buffer.from(text, 'utf8') : text;
  const length = Buffer.alloc(2);
  length.writeUInt16BE(bytes.length);
  return Buffer.concat([length, bytes]);
}

/** The "remaining length" of a fixed header (§2.2.3). */
export function remainingLength(n: number): Buffer {
  const out: number[] = [];
  do {
    let byte = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) byte |= 0x80;
    out.push(byte);
  } while (n > 0);
  return Buffer.from(out);
}

export function packet(firstByte: number, body: Buffer): Buffer {
  return Buffer.concat([Buffer.from([firstByte]), remainingLength(body.length), body]);
}

export interface ConnectFields {
  protocol?: string;
  level?: number;
  flags?: number;
  keepAlive?: number;
  clientId: string;
  username?: string;
  password?: string;
}

export function connectPacket(f: ConnectFields): Buffer {
  const flags = f.flags ?? (f.username ? 0x80 : 0) | (f.password ? 0x40 : 0) | 0x02;
  const keepAlive = Buffer.alloc(2);
  keepAlive.writeUInt16BE(f.keepAlive ?? 30);
  return packet(
    0x10,
    Buffer.concat([
      mqttString(f.protocol ?? 'MQTT'),
      Buffer.from([f.level ?? 4, flags]),
      keepAlive,
      mqttString(f.clientId),
      ...(f.username !== undefined ? [mqttString(f.username)] : []),
      ...(f.password !== undefined ? [mqttString(f.password)] : []),
    ]),
  );
}

export function publishPacket(
  topic: string | Buffer,
  payload: string,
  options: { qos?: number; messageId?: number; firstByte?: number } = {},
): Buffer {
  const qos = options.qos ?? 1;
  const id = Buffer.alloc(2);
  id.writeUInt16BE(options.messageId ?? 1);
  return packet(
    options.firstByte ?? 0x30 | (qos << 1),
    Buffer.concat([mqttString(topic), ...(qos > 0 ? [id] : []), Buffer.from(payload)]),
  );
}

/**
 * One raw case: the bytes to write. `authenticated` cases are written after a valid CONNECT of
 * the gateway (its CONNACK is read first). The broker must close the connection (or refuse the
 * CONNECT) and keep serving everyone else.
 */
export interface RawCase {
  what: string;
  authenticated: boolean;
  bytes: (gateway: { gatewayId: string; secret: string }) => Buffer;
  /** When the broker answers a refused CONNECT: the CONNACK return code it must send. */
  connackCode?: number;
  /** The broker may keep the connection open (the bytes are harmless); default false. */
  mayStayOpen?: boolean;
}

const ok = (g: { gatewayId: string; secret: string }) => ({
  clientId: g.gatewayId,
  username: g.gatewayId,
  password: g.secret,
});

export const RAW_CASES: readonly RawCase[] = [
  {
    what: 'an HTTP request',
    authenticated: false,
    bytes: () => Buffer.from('GET / HTTP/1.1\r\nHost: x\r\n\r\n'),
  },
  {
    what: 'a TLS ClientHello',
    authenticated: false,
    bytes: () => Buffer.from([0x16, 0x03, 0x01, 0x02, 0x00, 0x01, 0x00, 0x01, 0xfc, 0x03, 0x03]),
  },
  { what: 'zero bytes', authenticated: false, bytes: () => Buffer.alloc(64) },
  { what: '0xFF bytes', authenticated: false, bytes: () => Buffer.alloc(64, 0xff) },
  {
    what: 'PUBLISH before CONNECT',
    authenticated: false,
    bytes: () => publishPacket('gateways/x/senml', '[]'),
  },
  {
    what: 'SUBSCRIBE before CONNECT',
    authenticated: false,
    bytes: () =>
      packet(0x82, Buffer.concat([Buffer.from([0, 1]), mqttString('#'), Buffer.from([1])])),
  },
  { what: 'PINGREQ before CONNECT', authenticated: false, bytes: () => Buffer.from([0xc0, 0x00]) },
  {
    what: 'CONNECT with protocol name MQTX',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), protocol: 'MQTX' }),
  },
  {
    what: 'CONNECT of MQTT 5',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), level: 5 }),
  },
  {
    what: 'CONNECT with protocol level 7',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), level: 7 }),
  },
  {
    what: 'CONNECT with the reserved flag set',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), flags: 0xc3 }),
  },
  {
    what: 'CONNECT with a password but no user name flag',
    authenticated: false,
    bytes: (g) => connectPacket({ clientId: g.gatewayId, password: g.secret, flags: 0x42 }),
  },
  {
    what: 'CONNECT with will QoS 3',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), flags: 0xc0 | 0x18 | 0x04 | 0x02 }),
  },
  {
    what: 'CONNECT with user name flag but no user name',
    authenticated: false,
    bytes: (g) => connectPacket({ clientId: g.gatewayId, flags: 0x82 }),
  },
  {
    what: 'CONNECT truncated in its client id',
    // The broker waits for the rest until its connect timeout.
    mayStayOpen: true,
    authenticated: false,
    bytes: (g) => connectPacket(ok(g)).subarray(0, 16),
  },
  {
    what: 'CONNECT with a 5-byte remaining length',
    authenticated: false,
    bytes: () => Buffer.from([0x10, 0xff, 0xff, 0xff, 0xff, 0x01]),
  },
  {
    what: 'CONNECT with invalid UTF-8 client id',
    authenticated: false,
    bytes: (g) =>
      packet(
        0x10,
        Buffer.concat([
          mqttString('MQTT'),
          Buffer.from([4, 0xc2, 0, 30]),
          mqttString(Buffer.from([0xff, 0xfe])),
          mqttString(g.gatewayId),
          mqttString(g.secret),
        ]),
      ),
  },
  {
    what: 'CONNECT with a client id longer than its packet',
    authenticated: false,
    bytes: () =>
      packet(
        0x10,
        Buffer.concat([mqttString('MQTT'), Buffer.from([4, 0x02, 0, 30, 0x7f, 0xff, 0x61])]),
      ),
  },
  {
    what: 'CONNECT with a wrong secret',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), password: 'not-the-secret' }),
    connackCode: 4,
  },
  {
    what: 'CONNECT with a 2,000-byte client id',
    authenticated: false,
    bytes: (g) => connectPacket({ ...ok(g), clientId: 'g'.repeat(2000) }),
    connackCode: 2,
  },
  {
    what: 'a packet of reserved type 0',
    authenticated: true,
    bytes: () => Buffer.from([0x00, 0x00]),
  },
  {
    what: 'a packet of reserved type 15',
    authenticated: true,
    bytes: () => Buffer.from([0xf0, 0x00]),
  },
  { what: 'a second CONNECT', authenticated: true, bytes: (g) => connectPacket(ok(g)) },
  {
    what: 'PUBLISH with QoS 3',
    authenticated: true,
    bytes: (g) => publishPacket(`gateways/${g.gatewayId}/senml`, '[]', { firstByte: 0x36 }),
  },
  {
    what: 'PUBLISH to a wildcard topic',
    authenticated: true,
    bytes: (g) => publishPacket(`gateways/${g.gatewayId}/#`, '[]'),
  },
  {
    what: 'PUBLISH with a topic longer than the packet',
    authenticated: true,
    bytes: () => packet(0x32, Buffer.from([0x7f, 0xff, 0x61, 0x62])),
  },
  {
    what: 'PUBLISH with invalid UTF-8 in its topic',
    authenticated: true,
    bytes: (g) =>
      publishPacket(
        Buffer.concat([Buffer.from(`gateways/${g.gatewayId}/`), Buffer.from([0xc0, 0xaf])]),
        '[]',
      ),
  },
  {
    what: 'PUBLISH with an empty topic',
    authenticated: true,
    bytes: () => publishPacket('', '[]'),
  },
  {
    what: 'SUBSCRIBE with no topics',
    authenticated: true,
    bytes: () => packet(0x82, Buffer.from([0, 1])),
  },
  {
    what: 'SUBSCRIBE with wrong flags',
    authenticated: true,
    bytes: (g) =>
      packet(
        0x80,
        Buffer.concat([
          Buffer.from([0, 1]),
          mqttString(`gateways/${g.gatewayId}/#`),
          Buffer.from([1]),
        ]),
      ),
  },
  {
    what: 'SUBSCRIBE with requested QoS 3',
    authenticated: true,
    bytes: (g) =>
      packet(
        0x82,
        Buffer.concat([
          Buffer.from([0, 1]),
          mqttString(`gateways/${g.gatewayId}/#`),
          Buffer.from([3]),
        ]),
      ),
  },
  {
    what: 'PUBREL for nothing',
    authenticated: true,
    bytes: () => Buffer.from([0x62, 0x02, 0x12, 0x34]),
    mayStayOpen: true,
  },
  {
    what: 'PUBACK for nothing',
    authenticated: true,
    bytes: () => Buffer.from([0x40, 0x02, 0x12, 0x34]),
    mayStayOpen: true,
  },
  // A slow sender: the broker waits for the rest until the keep-alive runs out.
  {
    what: 'a declared length then silence (header only)',
    authenticated: true,
    bytes: () => Buffer.from([0x32, 0x80, 0x80, 0x04]),
    mayStayOpen: true,
  },
  {
    what: 'a 2-MB declared PUBLISH',
    authenticated: true,
    bytes: () => Buffer.from([0x32, 0x80, 0x80, 0x80, 0x01]),
  },
];

/**
 * PostgreSQL array literals ('{1,2,NULL}') for unnest() and any() parameters whose size grows
 * with the fleet or the load (the batch insert, last-seen times, latest channel values). node-pg
 * turns a JavaScript array into the same text itself, but element by element with two regular
 * expressions each: for the ~60,000 values a second a busy ingest sends, that showed up in its
 * profile, and the latest values of 10,000 sites (4 arrays of 80,000) took 230-660 ms of the
 * event loop every 5 s, which held every PUBACK waiting behind it. Numbers need no quoting
 * (String() gives the shortest text that reads back as the same double, as node-pg's own
 * conversion does); strings are quoted and escaped.
 */
export function numberArrayLiteral(values: readonly (number | null)[]): string {
  let out = '{';
  for (let i = 0; i < values.length; i++) {
    if (i > 0) out += ',';
    const v = values[i];
    out += v === null || v === undefined ? 'NULL' : String(v);
  }
  return `${out}}`;
}

export function booleanArrayLiteral(values: readonly (boolean | null)[]): string {
  return `{${values.map((v) => (v === null || v === undefined ? 'NULL' : v ? 't' : 'f')).join(',')}}`;
}

export function textArrayLiteral(values: readonly (string | null)[]): string {
  let out = '{';
  for (let i = 0; i < values.length; i++) {
    if (i > 0) out += ',';
    const v = values[i];
    if (v === null || v === undefined) out += 'NULL';
    else if (v.includes('"') || v.includes('\\')) {
      out += `"${v.replace(/[\\"]/g, (c) => `\\${c}`)}"`;
    } else out += `"${v}"`;
  }
  return `${out}}`;
}

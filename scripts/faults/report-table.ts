import type { FaultRow } from './fault-run.js';

/** A plain text table: a header row, a rule, then the rows, columns padded to fit. */
export function textTable(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]) =>
    cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('  ');
  return [line(header), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

/** The figures of every fault, one row each (the table `npm run faults` prints). */
export function faultTable(rows: readonly FaultRow[]): string {
  return textTable(
    [
      'fault',
      'acknowledged',
      'stored',
      'missing',
      'duplicates',
      're-sent',
      'recovery ms',
      'buckets ok',
      'pump runs ok',
      'mail sent/dup',
      'streams resumed',
    ],
    rows.map((r) => [
      r.fault,
      String(r.telemetry.acknowledged),
      String(r.telemetry.stored),
      String(r.telemetry.missing),
      String(r.telemetry.duplicateRows),
      String(r.telemetry.resent),
      r.recoveryMs === null ? 'none' : String(Math.round(r.recoveryMs)),
      `${r.buckets.compared - r.buckets.mismatched}/${r.buckets.compared}`,
      `${r.pumpRuns.compared - r.pumpRuns.mismatched}/${r.pumpRuns.compared}`,
      `${r.mail.delivered}/${r.mail.duplicated}`,
      `${r.sse.resumed}/${r.sse.clients}`,
    ]),
  );
}

export const TABLE_LEGEND = [
  'acknowledged: packs of the fault window a gateway got a PUBACK for; stored: packs with every record in the database;',
  'missing: acknowledged but not stored (must be 0); duplicates: records stored more than once (must be 0);',
  're-sent: packs that reached the broker more than once (re-sends after reconnecting, deliberate repeats);',
  'recovery ms: from removing the fault to the first PUBACK (postgres, ingest), to every due mail sent (smtp),',
  'or to every live stream receiving a new event (api); buckets/pump runs ok: equal to a recomputation from raw rows;',
  'mail sent/dup: alert mails delivered / extra copies (must be 0); streams resumed: live event streams that got a new event.',
].join('\n');

/**
 * Groups a reject reason into a small fixed set for the metrics label (the reasons themselves
 * carry names and values, which would make one time series per distinct text).
 */
export function rejectCategory(reason: string): string {
  if (
    /not valid JSON|must be a JSON array|pack is|bytes|records, more than|not an object|must-understand|SenML version|bver/i.test(
      reason,
    )
  )
    return 'pack';
  if (/in the future|in the past|time /.test(reason)) return 'time';
  if (/outside .*–/.test(reason)) return 'range';
  if (/unit/.test(reason)) return 'unit';
  if (/not a Wellkept measurement name|does not start with|belongs to gateway|name/.test(reason))
    return 'name';
  if (/repeats record/.test(reason)) return 'repeated';
  if (/needs |must be|has no value|more than one value|is not a stage/.test(reason)) return 'value';
  return 'other';
}

/**
 * Text as PostgreSQL can store it: a `text` value cannot hold the NUL character, and one NUL in
 * a gateway's bad record would fail the whole group commit (and every pack in it). NUL is shown
 * as the visible symbol U+2400 instead.
 */
export function storableText(text: string): string {
  return text.includes('\u0000') ? text.replaceAll('\u0000', '\u2400') : text;
}

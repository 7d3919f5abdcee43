/**
 * Groups a reject reason into a small fixed set for the metrics label (the reasons themselves
 * carry names and values, which would make one time series per distinct text).
 */
export function rejectCategory(reason: string): string {
  if (/not valid JSON|must be a JSON array|pack is|bytes|records, more than/i.test(reason))
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

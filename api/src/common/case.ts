/** Rows are snake_case (SQL), JSON is camelCase: one pair of converters for plain objects. */
export function toCamel<T extends Record<string, unknown>>(row: T): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(row))
    out[k.replace(/_([a-z0-9])/g, (_m, c: string) => c.toUpperCase())] = v;
  return out;
}

export function toSnake(obj: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(obj)) {
    if (v !== undefined) out[k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)] = v;
  }
  return out;
}

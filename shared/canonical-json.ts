/**
 * JSON with object keys sorted at every level and undefined members left out, so that two documents
 * that differ only in key order read alike (PostgreSQL jsonb does not keep key order, and editors write
 * keys in any order). Array order is kept: it means something in a model file.
 */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, item]) => item !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([key, item]) => `${JSON.stringify(key)}:${canonicalJson(item)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

/** Whether two JSON documents hold the same content, whatever the order of their keys. */
export function sameJsonContent(a: unknown, b: unknown): boolean {
  return canonicalJson(a) === canonicalJson(b);
}

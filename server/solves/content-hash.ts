import { createHash } from 'node:crypto';
import type { ModelFile } from '../../shared/model-file.js';
import type { SolveSettings } from '../../shared/api/solves.js';

/**
 * JSON with object keys sorted at every level, so that two documents that differ only in key order hash
 * alike (PostgreSQL jsonb does not keep key order, and editors write keys in any order).
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

function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}

/**
 * Hash of what a solve depends on: the whole model file except `layout` (where the boxes sit on the
 * canvas changes no number). Revisions store it; results are looked up by it.
 */
export function modelContentHash(model: ModelFile): string {
  const { layout: _layout, ...content } = model;
  return sha256(canonicalJson(content));
}

/** Key of the stored results: one result per model content, solver version and settings. */
export function resultCacheKey(contentHash: string, solverVersion: string, settings: SolveSettings): string {
  return sha256(canonicalJson({ contentHash, solverVersion, settings }));
}

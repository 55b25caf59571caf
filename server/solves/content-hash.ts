import { createHash } from 'node:crypto';
import type { ModelFile } from '../../shared/model-file.js';
import type { SolveSettings } from '../../shared/api/solves.js';
import { canonicalJson } from '../../shared/canonical-json.js';

export { canonicalJson };

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

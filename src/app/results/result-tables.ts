import type { ModelFile } from '../../../shared/model-file.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { contributionsOf, type Contribution } from '../../../solver/analysis/contributions.js';

/** The label of every item of a model by id (events, gates, common-cause groups, states). */
export function itemLabels(model: ModelFile): Map<string, string> {
  const labels = new Map<string, string>();
  const items = model.kind === 'fault-tree' ? [...model.events, ...model.gates, ...(model.ccf ?? [])] : model.states;
  for (const item of items) labels.set(item.id, item.label ?? item.id);
  return labels;
}

export type ContributionRow = Contribution;

/** Contributions to PFDavg per subsystem, event and common-cause group (solver/analysis/contributions.ts). */
export function contributionRows(result: SolveResult, subsystems: readonly { id: string; label: string }[], labels: ReadonlyMap<string, string>): ContributionRow[] {
  return contributionsOf(result, subsystems, labels);
}

export interface CutSetRow {
  readonly rank: number;
  readonly events: readonly string[];
  readonly order: number;
  readonly probability: number;
  readonly share: number;
}

/** Minimal cut sets, the most probable first, ranked 1, 2, ...; `limit` keeps the first rows. */
export function cutSetRows(result: Pick<SolveResult, 'cutSets'>, limit = 200): CutSetRow[] {
  return [...result.cutSets]
    .sort((a, b) => b.probability - a.probability)
    .slice(0, limit)
    .map((set, index) => ({ rank: index + 1, events: set.events, order: set.order, probability: set.probability, share: set.share }));
}

export type ImportanceKey = 'birnbaum' | 'fussellVesely' | 'riskAchievementWorth' | 'riskReductionWorth';

export interface ImportanceRow {
  readonly id: string;
  readonly label: string;
  readonly kind: 'event' | 'gate' | 'ccf';
  readonly birnbaum: number;
  readonly fussellVesely: number;
  readonly riskAchievementWorth: number;
  readonly riskReductionWorth: number;
}

/** Importance measures of events, gates and common-cause groups, sorted by one measure, largest first. */
export function importanceRows(result: Pick<SolveResult, 'importance'>, labels: ReadonlyMap<string, string>, sortBy: ImportanceKey = 'fussellVesely'): ImportanceRow[] {
  return result.importance
    .map((item) => ({
      id: item.id,
      label: labels.get(item.id) ?? item.id,
      kind: item.kind,
      birnbaum: item.birnbaum,
      fussellVesely: item.fussellVesely,
      riskAchievementWorth: item.riskAchievementWorth,
      riskReductionWorth: item.riskReductionWorth,
    }))
    .sort((a, b) => b[sortBy] - a[sortBy]);
}

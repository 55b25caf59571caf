import type { SolveResult } from '../../shared/solve-result.js';

export interface Contribution {
  readonly id: string;
  readonly kind: 'subsystem' | 'event' | 'ccf';
  readonly label: string;
  /** Fussell-Vesely share of PFDavg (the fraction of it that involves the item). */
  readonly share: number;
  /** share x PFDavg. */
  readonly pfdAvg: number;
}

/**
 * Contributions to PFDavg for the weakest-link view: each subsystem (its gate's Fussell-Vesely
 * importance, or its event's), each basic event and each common-cause group, largest first per kind.
 * Fussell-Vesely of an item = the share of the top probability from cut sets containing it (Rausand &
 * Hoyland, System Reliability Theory 2nd ed., importance measures); shares of different items overlap.
 */
export function contributionsOf(result: Pick<SolveResult, 'importance' | 'pfdAvg'>, subsystems: readonly { id: string; label: string }[], labels: ReadonlyMap<string, string> = new Map()): Contribution[] {
  const byId = new Map(result.importance.map((item) => [item.id, item]));
  const row = (id: string, kind: Contribution['kind'], label: string, fussellVesely: number): Contribution => ({ id, kind, label, share: fussellVesely, pfdAvg: fussellVesely * result.pfdAvg });
  const subsystemRows = subsystems.flatMap((subsystem) => {
    const item = byId.get(subsystem.id);
    return item ? [row(subsystem.id, 'subsystem', subsystem.label, item.fussellVesely)] : [];
  });
  const itemRows = result.importance
    .filter((item) => item.kind === 'event' || item.kind === 'ccf')
    .map((item) => row(item.id, item.kind as 'event' | 'ccf', labels.get(item.id) ?? item.id, item.fussellVesely));
  const bySize = (a: Contribution, b: Contribution) => b.share - a.share;
  return [...subsystemRows.sort(bySize), ...itemRows.sort(bySize)];
}

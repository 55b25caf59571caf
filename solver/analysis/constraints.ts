import type { SilClaim, SilLimit, SubsystemConstraint } from '../../shared/api/results.js';
import type { DemandMode, FaultTreeModel, RateEvent } from '../../shared/model-file.js';
import type { SilLevel } from '../../shared/sil.js';
import { subsystemsOf } from './structure.js';

type MaxSil = SilLevel | null;

/**
 * IEC 61508-2:2010 7.4.4.2 (Route 1H), Table 2 (type A) and Table 3 (type B): the highest SIL of a
 * subsystem by its safe failure fraction (rows: < 60 %, 60 % to < 90 %, 90 % to < 99 %, >= 99 %) and its
 * hardware fault tolerance (columns: 0, 1, 2). null: not allowed.
 */
export const ROUTE_1H_TABLES: Readonly<Record<'A' | 'B', readonly (readonly MaxSil[])[]>> = {
  A: [
    [1, 2, 3],
    [2, 3, 4],
    [3, 4, 4],
    [3, 4, 4],
  ],
  B: [
    [null, 1, 2],
    [1, 2, 3],
    [2, 3, 4],
    [3, 4, 4],
  ],
};

/** Row of the Route 1H tables for an SFF; each band includes its lower bound. */
export function sffRow(sff: number): number {
  if (sff < 0.6) return 0;
  if (sff < 0.9) return 1;
  if (sff < 0.99) return 2;
  return 3;
}

/** Highest SIL allowed by Route 1H (IEC 61508-2:2010 Tables 2 and 3); HFT above 2 reads the HFT 2 column. */
export function route1HMaxSil(deviceType: 'A' | 'B', sff: number, hft: number): MaxSil {
  return ROUTE_1H_TABLES[deviceType][sffRow(sff)][Math.min(2, Math.max(0, Math.floor(hft)))];
}

/**
 * Minimum HFT of IEC 61511-1:2016 11.4.5, Table 6: SIL 1 any mode 0; SIL 2 low demand 0; SIL 2 high
 * demand or continuous 1; SIL 3 any mode 1; SIL 4 any mode 2.
 */
export function iec61511MinimumHft(sil: SilLevel, demand: DemandMode): number {
  if (sil === 1) return 0;
  if (sil === 2) return demand === 'low' ? 0 : 1;
  if (sil === 3) return 1;
  return 2;
}

/** The highest SIL whose IEC 61511-1:2016 Table 6 minimum HFT a subsystem with this HFT meets. */
export function iec61511MaxSil(hft: number, demand: DemandMode): SilLevel {
  for (const sil of [4, 3, 2, 1] as const) if (hft >= iec61511MinimumHft(sil, demand)) return sil;
  return 1;
}

/** Safe failure fraction of a device, IEC 61508-2:2010 Annex C: (lambdaS + lambdaDD) / (lambdaS + lambdaDD + lambdaDU). */
export function safeFailureFraction(event: Pick<RateEvent, 'lambdaDU' | 'lambdaDD' | 'lambdaS'>): number | null {
  const safe = (event.lambdaS ?? 0) + (event.lambdaDD ?? 0);
  const total = safe + event.lambdaDU;
  return total > 0 ? safe / total : null;
}

function minimumSil(values: readonly (SilLevel | undefined)[]): SilLevel | null {
  const stated = values.filter((value): value is SilLevel => value !== undefined);
  return stated.length > 0 ? (Math.min(...stated) as SilLevel) : null;
}

/**
 * Architectural constraints per subsystem of a fault tree: HFT from the structure, the lowest SFF of its
 * devices (conservative: a subsystem is held to its weakest element, common practice), type B when any
 * device is type B or states no type, the Route 1H limit, the IEC 61511-1 limit and the lowest
 * systematic capability of its devices.
 */
export function architecturalConstraints(model: FaultTreeModel): SubsystemConstraint[] {
  const demand = model.mission.demand;
  return subsystemsOf(model).map((subsystem) => {
    const notes: string[] = [];
    const fractions = subsystem.events.map(safeFailureFraction).filter((value): value is number => value !== null);
    const sff = fractions.length > 0 ? Math.min(...fractions) : null;
    const withoutSafe = subsystem.events.filter((event) => event.lambdaS === undefined).map((event) => event.id);
    if (withoutSafe.length > 0) notes.push(`no safe failure rate (lambdaS) for ${withoutSafe.join(', ')}: their SFF counts detected dangerous failures only`);
    const types = subsystem.events.map((event) => event.deviceType);
    const deviceTypeAssumed = types.every((type) => type === undefined);
    const deviceType = types.every((type) => type === 'A') ? 'A' : 'B';
    if (deviceTypeAssumed) notes.push('no device type stated: type B taken');
    else if (types.some((type) => type === undefined)) notes.push('some devices state no type: type B taken for the subsystem');
    const capabilities = subsystem.events.map((event) => event.systematicCapability as SilLevel | undefined);
    const systematicCapability = minimumSil(capabilities);
    if (systematicCapability !== null && capabilities.some((value) => value === undefined)) notes.push('some devices state no systematic capability; the lowest stated one is used');
    if (subsystem.probabilityEvents.length > 0) notes.push(`events with a fixed probability (${subsystem.probabilityEvents.join(', ')}) have no rates for the SFF`);
    if (subsystem.hft > 2) notes.push(`HFT ${subsystem.hft} is read as HFT 2, the last column of the Route 1H tables`);
    return {
      id: subsystem.id,
      label: subsystem.label,
      voting: subsystem.voting ?? null,
      hft: subsystem.hft,
      sff,
      deviceType,
      deviceTypeAssumed,
      route1HMaxSil: sff === null ? null : route1HMaxSil(deviceType, sff, subsystem.hft),
      iec61511MaxSil: iec61511MaxSil(subsystem.hft, demand),
      systematicCapability,
      events: [...subsystem.events.map((event) => event.id), ...subsystem.probabilityEvents],
      notes,
    };
  });
}

export interface ClaimInputs {
  /** SIL reached by the probability measure (PFDavg or PFH); null below SIL 1. */
  readonly probabilitySil: SilLevel | null;
  readonly demand: DemandMode;
  /** The figure, to say it in the reason, e.g. "PFDavg 3.2e-4". */
  readonly measureText: string;
  /** Per subsystem; null for a model whose subsystems are not known (state models). */
  readonly constraints: readonly SubsystemConstraint[] | null;
}

function percent(value: number): string {
  return `${(value * 100).toFixed(1)} %`;
}

/**
 * The SIL claim: the lowest of the probability result (IEC 61508-1:2010 Table 2 or 3), the architectural
 * constraints of each subsystem (IEC 61508-2:2010 Route 1H and IEC 61511-1:2016 11.4.5, the lower of the
 * two) and the devices' systematic capability (IEC 61508-2:2010 7.6.2.7). Every limit says which rule
 * set it.
 */
export function silClaim(inputs: ClaimInputs): SilClaim {
  const low = inputs.demand === 'low';
  const limits: SilLimit[] = [
    {
      rule: 'probability',
      source: low ? 'IEC 61508-1:2010 Table 2 (low demand, PFDavg)' : 'IEC 61508-1:2010 Table 3 (high demand or continuous, PFH)',
      subsystem: null,
      sil: inputs.probabilitySil,
      reason: inputs.probabilitySil === null ? `${inputs.measureText} is outside the SIL 1 band` : `${inputs.measureText} is in the SIL ${inputs.probabilitySil} band`,
    },
  ];
  for (const item of inputs.constraints ?? []) {
    limits.push({
      rule: 'iec61508-route-1h',
      source: `IEC 61508-2:2010 7.4.4.2, Table ${item.deviceType === 'A' ? '2 (type A)' : '3 (type B)'}`,
      subsystem: item.id,
      sil: item.route1HMaxSil,
      reason:
        item.sff === null
          ? `${item.label}: no failure rates, so no SFF`
          : `${item.label}: HFT ${item.hft}, SFF ${percent(item.sff)}, type ${item.deviceType}${item.deviceTypeAssumed ? ' (assumed)' : ''}`,
    });
    limits.push({
      rule: 'iec61511-minimum-hft',
      source: 'IEC 61511-1:2016 11.4.5, Table 6',
      subsystem: item.id,
      sil: item.iec61511MaxSil,
      reason: `${item.label}: HFT ${item.hft} meets the minimum HFT of SIL ${item.iec61511MaxSil} (${low ? 'low demand' : 'high demand or continuous'})`,
    });
    if (item.systematicCapability !== null) {
      limits.push({
        rule: 'systematic-capability',
        source: 'IEC 61508-2:2010 7.6.2.7',
        subsystem: item.id,
        sil: item.systematicCapability,
        reason: `${item.label}: lowest systematic capability of its devices is SC ${item.systematicCapability}`,
      });
    }
  }
  const sil = limits.some((limit) => limit.sil === null) ? null : (Math.min(...limits.map((limit) => limit.sil as number)) as SilLevel);
  return { sil, limits };
}

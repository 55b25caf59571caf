import type { SpuriousTrip } from '../../shared/api/results.js';
import { isProbabilityEvent, type FaultTreeModel } from '../../shared/model-file.js';
import { failuresToFail, subsystemsOf } from './structure.js';

/** Restoration time taken for a safe failure when an event states no mttrHours (common practice: 8 h). */
export const DEFAULT_SAFE_RESTORATION_HOURS = 8;

interface Tripper {
  /** Spurious trips per hour. */
  readonly rate: number;
  /** Mean time the item stays tripped (hours). */
  readonly restorationHours: number;
}

/**
 * Spurious trip rate of M tripped inputs out of n, the rare-event form: the sum over every set S of M
 * inputs of the rate at which the last of S trips while the others are still tripped,
 * sum_S sum_{i in S} lambda_i prod_{j in S, j != i} lambda_j MTTR_j. For identical channels this is
 * C(n, M) M lambda^M MTTR^(M-1): 1oo2 2 lambda, 2oo2 2 lambda^2 MTTR, 2oo3 6 lambda^2 MTTR (PDS method
 * handbook, spurious trip rate formulas; Rausand & Hoyland, System Reliability Theory 2nd ed., ch. 8;
 * from memory).
 */
export function votedTripRate(inputs: readonly Tripper[], m: number): number {
  const n = inputs.length;
  if (m < 1 || m > n) return 0;
  let total = 0;
  const chosen: number[] = [];
  const visit = (start: number) => {
    if (chosen.length === m) {
      for (const last of chosen) {
        let rate = inputs[last].rate;
        for (const other of chosen) if (other !== last) rate *= inputs[other].rate * inputs[other].restorationHours;
        total += rate;
      }
      return;
    }
    for (let index = start; index <= n - (m - chosen.length); index++) {
      chosen.push(index);
      visit(index + 1);
      chosen.pop();
    }
  };
  visit(0);
  return total;
}

/**
 * The function's spurious trip rate and MTTFspurious from the safe failure rates (lambdaS) and the voting.
 * A subsystem (an input of the top OR gate) trips the function on its own: the subsystems add. Inside a
 * subsystem a gate that fails at k of its n inputs' dangerous failures is MooN with M = n - k + 1, and
 * trips when M inputs trip. A common-cause group adds beta * lambdaS of its members once (beta model,
 * IEC 61508-6:2010 Annex D applied to safe failures, common practice).
 */
export function spuriousTripRate(model: FaultTreeModel): SpuriousTrip {
  const notes = new Set<string>();
  const tripperOf = (id: string): Tripper => {
    const gate = model.gates.find((candidate) => candidate.id === id);
    if (!gate) {
      const event = model.events.find((candidate) => candidate.id === id);
      if (!event || isProbabilityEvent(event)) return { rate: 0, restorationHours: DEFAULT_SAFE_RESTORATION_HOURS };
      const group = (model.ccf ?? []).find((candidate) => candidate.members.includes(id));
      if (event.lambdaS === undefined) notes.add(`no safe failure rate (lambdaS) for ${event.id}: taken as 0`);
      if (event.mttrHours === undefined) notes.add(`no mttrHours for ${event.id}: a safe failure is taken as restored in ${DEFAULT_SAFE_RESTORATION_HOURS} h`);
      return { rate: (event.lambdaS ?? 0) * (1 - (group?.beta ?? 0)), restorationHours: event.mttrHours ?? DEFAULT_SAFE_RESTORATION_HOURS };
    }
    const inputs = gate.inputs.map(tripperOf);
    const m = gate.inputs.length - failuresToFail(gate) + 1;
    const rate = votedTripRate(inputs, m);
    const restorationHours = inputs.reduce((sum, input) => sum + input.restorationHours, 0) / Math.max(1, inputs.length);
    return { rate, restorationHours };
  };
  const commonCauseRate = (memberIds: readonly string[]): number => {
    let rate = 0;
    for (const group of model.ccf ?? []) {
      if (!group.members.some((member) => memberIds.includes(member))) continue;
      const rates = group.members.map((member) => {
        const event = model.events.find((candidate) => candidate.id === member);
        return event && !isProbabilityEvent(event) ? (event.lambdaS ?? 0) : 0;
      });
      rate += group.beta * Math.min(...rates);
    }
    return rate;
  };
  const subsystems = subsystemsOf(model).map((subsystem) => {
    const own = tripperOf(subsystem.id).rate;
    const common = commonCauseRate([...subsystem.events.map((event) => event.id)]);
    const subsystemNotes = common > 0 ? [`common cause adds ${common.toExponential(2)} per hour (beta times the smallest lambdaS of the group)`] : [];
    return { id: subsystem.id, label: subsystem.label, voting: subsystem.voting ?? null, ratePerHour: own + common, notes: subsystemNotes };
  });
  const ratePerHour = subsystems.reduce((sum, item) => sum + item.ratePerHour, 0);
  return {
    ratePerHour,
    mttfSpuriousHours: ratePerHour > 0 ? 1 / ratePerHour : null,
    subsystems,
    method: 'MooN trips when M channels trip: rare-event sum of C(n, M) terms lambdaS^M MTTR^(M-1) (PDS method); subsystems in series add; beta of safe failures for common cause',
    notes: [...notes],
  };
}

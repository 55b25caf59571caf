import { describe, expect, it } from 'vitest';
import { solveModel } from '../index.js';
import { faultTree, votedGroup } from './test-models.js';

describe('minimal cut sets from the decision diagram (Rauzy 1993 minimal solutions; expected sets by the Boolean algebra of the tree)', () => {
  it('2oo3 with a beta group: the shared event alone and the three pairs', () => {
    const result = solveModel(votedGroup(3, 2, { lambdaDU: 1e-6, intervalHours: 8760, missionHours: 87600, beta: 0.05 }));
    const sets = result.cutSets.map((cutSet) => [...cutSet.events].sort().join('+')).sort();
    expect(sets).toEqual(['CCF', 'CH-1+CH-2', 'CH-1+CH-3', 'CH-2+CH-3']);
    expect(result.cutSets[0].events).toEqual(['CCF']);
    expect(result.cutSets.reduce((sum, cutSet) => sum + cutSet.share, 0)).toBeCloseTo(1, 12);
  });

  it('a shared event absorbs the larger sets it is part of: (A or B) and (A or C) gives {A}, {B, C}', () => {
    const model = faultTree({
      missionHours: 100,
      events: ['A', 'B', 'C'].map((id) => ({ id, probability: 0.1 })),
      gates: [
        { id: 'TOP', type: 'and', inputs: ['G1', 'G2'] },
        { id: 'G1', type: 'or', inputs: ['A', 'B'] },
        { id: 'G2', type: 'or', inputs: ['A', 'C'] },
      ],
      top: 'TOP',
    });
    const result = solveModel(model);
    expect(result.cutSets.map((cutSet) => cutSet.events.join('+'))).toEqual(['A', 'B+C']);
    // Constant probabilities: P({A}) = 0.1, P({B, C}) = 0.01 (product of the members).
    expect(result.cutSets[0].probability).toBeCloseTo(0.1, 14);
    expect(result.cutSets[1].probability).toBeCloseTo(0.01, 14);
    // P(top) = P(A) + (1 - P(A)) P(B) P(C), exact.
    expect(result.pfdAvg).toBeCloseTo(0.1 + 0.9 * 0.01, 14);
  });
});

describe('importance measures (definitions: Rausand & Hoyland, System Reliability Theory, importance chapter; Fussell-Vesely in its "reduction" form (P - P(top | item works)) / P)', () => {
  // AND(A, B) with constant probabilities qa, qb: P = qa qb; Birnbaum of A = qb; FV of A = 1; RAW of A =
  // qb / (qa qb) = 1 / qa; RRW of A = infinite (P(top | A works) = 0). OR(G, C) with G = AND(A, B) adds C.
  const qa = 0.2;
  const qb = 0.05;
  const qc = 0.02;
  const model = faultTree({
    missionHours: 100,
    events: [
      { id: 'A', probability: qa },
      { id: 'B', probability: qb },
      { id: 'C', probability: qc },
    ],
    gates: [
      { id: 'TOP', type: 'or', inputs: ['PAIR', 'C'] },
      { id: 'PAIR', type: 'and', inputs: ['A', 'B'] },
    ],
    top: 'TOP',
  });
  const result = solveModel(model);
  const top = qa * qb + qc - qa * qb * qc;
  const byId = (id: string) => result.importance.find((item) => item.id === id);

  it('Birnbaum, Fussell-Vesely, RAW and RRW of the events (1e-12 relative)', () => {
    const a = byId('A');
    expect(a?.birnbaum).toBeCloseTo(qb * (1 - qc), 14);
    expect(a?.fussellVesely).toBeCloseTo((qa * qb * (1 - qc)) / top, 12);
    expect(a?.riskAchievementWorth).toBeCloseTo((qb + qc - qb * qc) / top, 12);
    expect(a?.riskReductionWorth).toBeCloseTo(top / qc, 10);
    const c = byId('C');
    expect(c?.birnbaum).toBeCloseTo(1 - qa * qb, 14);
    expect(c?.riskAchievementWorth).toBeCloseTo(1 / top, 10);
  });

  it('gate importance: the pair gate fixed failed or working', () => {
    const pair = byId('PAIR');
    expect(pair?.kind).toBe('gate');
    expect(pair?.birnbaum).toBeCloseTo(1 - qc, 14);
    expect(pair?.riskAchievementWorth).toBeCloseTo(1 / top, 10);
    expect(pair?.fussellVesely).toBeCloseTo((top - qc) / top, 12);
    expect(byId('TOP')?.birnbaum).toBeCloseTo(1, 14);
  });

  it('the shares of the basic items sum to 1 and rank the weakest link first', () => {
    const basic = result.importance.filter((item) => item.kind !== 'gate');
    expect(basic.reduce((sum, item) => sum + item.share, 0)).toBeCloseTo(1, 12);
    const weakest = [...basic].sort((x, y) => y.share - x.share)[0];
    expect(weakest.id).toBe('C');
  });

  it('the time-averaged Birnbaum importance of a channel in 1oo2 equals the average of the other channel\'s q', () => {
    const lambda = 1e-5;
    const tau = 1000;
    const voted = solveModel(votedGroup(2, 2, { lambdaDU: lambda, intervalHours: tau, missionHours: 4 * tau }));
    // B_1(t) = q_2(t) = 1 - e^{-lambda s}: its average over a test period is 1 - (1 - e^{-lambda tau}) / (lambda tau).
    const expected = 1 + Math.expm1(-lambda * tau) / (lambda * tau);
    expect(Math.abs((voted.importance[0].birnbaum - expected) / expected)).toBeLessThan(1e-6);
  });
});

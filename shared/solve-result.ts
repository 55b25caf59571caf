import { z } from 'zod';
import { silLevel } from './sil.js';

/**
 * The result of one solve, as printed by `npm run solve -- --json`, stored by the server and read by the
 * results view. Every engine (fault tree, Markov, Monte Carlo) fills the common keys; the optional blocks
 * are filled by the engines that compute them.
 */
export const curve = z.object({
  hours: z.array(z.number()),
  pfd: z.array(z.number()),
  /**
   * The function's dangerous failure frequency w(t), per hour, at each of `hours` (fault tree: the sum of
   * each event's Birnbaum importance times its failure frequency; Markov: the probability flow from up
   * states into down states). Its time average is `pfh`. Absent when the engine does not compute it.
   */
  frequency: z.array(z.number()).optional(),
});

export const simplifiedValue = z.object({
  /** What was matched, e.g. "SENSORS: 2oo3" or "whole function: 1oo2". */
  scope: z.string(),
  /** The formula's name and source, e.g. "IEC 61508-6:2010 B.3.2.2.3 (2oo3)". */
  formula: z.string(),
  pfdAvg: z.number().nullable(),
  pfh: z.number().nullable(),
  /** (exact - simplified) / simplified for the matching measure, when the scope is the whole function. */
  deviation: z.number().nullable(),
  warnings: z.array(z.string()),
});

export const cutSet = z.object({
  events: z.array(z.string()),
  order: z.number().int(),
  /** Time-averaged probability of the cut set (product of its events' unavailabilities, averaged). */
  probability: z.number(),
  /** Share of the top PFDavg, probability / sum over cut sets (rare-event view, for ranking only). */
  share: z.number(),
});

export const importance = z.object({
  id: z.string(),
  kind: z.enum(['event', 'gate', 'ccf']),
  birnbaum: z.number(),
  fussellVesely: z.number(),
  riskAchievementWorth: z.number(),
  riskReductionWorth: z.number(),
  /** Share of PFDavg attributed to the item ("weakest link"). */
  share: z.number(),
});

export const confidenceInterval = z.object({
  level: z.number(),
  lower: z.number(),
  upper: z.number(),
});

export const solveResult = z.object({
  method: z.enum(['fault-tree', 'markov', 'montecarlo']),
  /** Which numerical method ran and why (e.g. "BDD, 412 nodes", "Pade per phase, 16 states"). */
  algorithm: z.string(),
  solverVersion: z.string(),
  demand: z.enum(['low', 'high', 'continuous']),
  missionHours: z.number(),
  pfdAvg: z.number(),
  pfdMax: z.number(),
  pfh: z.number(),
  rrf: z.number(),
  /** SIL reached by the measure of the demand mode (PFDavg for low, PFH otherwise); null below SIL 1. */
  sil: silLevel.nullable(),
  curve,
  simplified: z.array(simplifiedValue),
  cutSets: z.array(cutSet),
  importance: z.array(importance),
  /** Markov only: each state's probability at the curve's hours. */
  states: z.array(z.object({ id: z.string(), probability: z.array(z.number()) })).optional(),
  /** Monte Carlo only. */
  interval: z.object({ pfdAvg: confidenceInterval, pfh: confidenceInterval }).optional(),
  samples: z.number().int().optional(),
  warnings: z.array(z.string()),
  /** Stated numerical error bound of pfdAvg (relative), where the method gives one. */
  errorBound: z.number().optional(),
});
export type SolveResult = z.infer<typeof solveResult>;

import { z } from 'zod';
import { modelFile } from '../model-file.js';
import { silLevel } from '../sil.js';
import { recordId } from './common.js';
import { derivedSifTarget, sifDemandMode, sifTarget } from './sif-target.js';
import { sifStatus } from './sifs.js';

/**
 * What the results workspace reads beside the stored solve: the model file as it was solved, the SIF it
 * belongs to, the architectural constraints, the SIL claim and the spurious trip rate. These are cheap
 * (no solve), so the API computes them on request. Sensitivity and uncertainty re-solve the model many
 * times; the client runs them (solver/analysis) and the API thread never does.
 * Roles: every member of the project (and a site admin) reads these routes; nobody changes anything.
 *
 * GET /api/projects/:projectId/solves/:solveId/analysis       200 resultAnalysis
 * GET /api/projects/:projectId/solves/:solveId/report         200 application/pdf (attachment)
 * GET /api/projects/:projectId/solves/:solveId/csv?table=...  200 text/csv (attachment)
 */

/** The rule a SIL limit comes from. */
export const LIMIT_RULES = ['probability', 'iec61508-route-1h', 'iec61511-minimum-hft', 'systematic-capability'] as const;
export const limitRule = z.enum(LIMIT_RULES);
export type LimitRule = z.infer<typeof limitRule>;

export const silLimit = z.object({
  rule: limitRule,
  /** The clause or table, e.g. "IEC 61508-2:2010 7.4.4.2, Table 3 (type B)". */
  source: z.string(),
  /** The subsystem the limit is about, or null for the whole function. */
  subsystem: z.string().nullable(),
  /** The highest SIL this limit allows; null when it allows none (not even SIL 1). */
  sil: silLevel.nullable(),
  reason: z.string(),
});
export type SilLimit = z.infer<typeof silLimit>;

export const subsystemConstraint = z.object({
  /** Id of the gate or event that is the subsystem in the fault tree. */
  id: z.string(),
  label: z.string(),
  /** MooN voting when the subsystem is one voted group, e.g. "2oo3"; null otherwise. */
  voting: z.string().nullable(),
  /** Hardware fault tolerance: the smallest number of failures that fail the subsystem, less one. */
  hft: z.number().int().min(0),
  /** Lowest safe failure fraction of its devices, (lambdaS + lambdaDD) / (lambdaS + lambdaDD + lambdaDU); null when it has no rates. */
  sff: z.number().min(0).max(1).nullable(),
  deviceType: z.enum(['A', 'B']),
  /** True when no device of the subsystem stated its type and B was taken. */
  deviceTypeAssumed: z.boolean(),
  /** IEC 61508-2:2010 Route 1H, Tables 2 and 3. */
  route1HMaxSil: silLevel.nullable(),
  /** IEC 61511-1:2016 11.4.5, Table 6: the highest SIL whose minimum HFT the subsystem meets. */
  iec61511MaxSil: silLevel,
  /** Lowest systematic capability of its devices; null when none is stated. */
  systematicCapability: silLevel.nullable(),
  /** Ids of the basic events of the subsystem. */
  events: z.array(z.string()),
  notes: z.array(z.string()),
});
export type SubsystemConstraint = z.infer<typeof subsystemConstraint>;

export const silClaim = z.object({
  /** The lowest of all limits; null when a limit allows no SIL. */
  sil: silLevel.nullable(),
  limits: z.array(silLimit),
});
export type SilClaim = z.infer<typeof silClaim>;

export const spuriousTripSubsystem = z.object({
  id: z.string(),
  label: z.string(),
  voting: z.string().nullable(),
  /** Spurious trips per hour caused by this subsystem. */
  ratePerHour: z.number().min(0),
  notes: z.array(z.string()),
});

export const spuriousTrip = z.object({
  /** Spurious trips of the function per hour: the sum over the subsystems in series. */
  ratePerHour: z.number().min(0),
  /** Mean time to a spurious trip in hours (1 / rate); null when the rate is 0. */
  mttfSpuriousHours: z.number().positive().nullable(),
  subsystems: z.array(spuriousTripSubsystem),
  /** The formula and its source. */
  method: z.string(),
  notes: z.array(z.string()),
});
export type SpuriousTrip = z.infer<typeof spuriousTrip>;

export const resultSif = z.object({
  id: recordId,
  tag: z.string(),
  title: z.string(),
  demandMode: sifDemandMode,
  target: sifTarget,
  derivedTarget: derivedSifTarget,
  status: sifStatus,
});

/** A succeeded solve of the same model content by one method (the latest), for the methods side by side. */
export const methodResult = z.object({
  solveId: recordId,
  method: z.enum(['exact', 'montecarlo']),
  engine: z.enum(['fault-tree', 'markov', 'montecarlo']),
  algorithm: z.string(),
  pfdAvg: z.number(),
  pfh: z.number(),
  interval: z.object({ pfdAvg: z.object({ level: z.number(), lower: z.number(), upper: z.number() }), pfh: z.object({ level: z.number(), lower: z.number(), upper: z.number() }) }).nullable(),
  samples: z.number().int().nullable(),
});
export type MethodResult = z.infer<typeof methodResult>;

export const resultAnalysis = z.object({
  solveId: recordId,
  modelId: recordId,
  modelName: z.string(),
  sif: resultSif,
  /** The model file exactly as it was solved. */
  model: modelFile,
  /** Fault trees only; null for state models (their subsystems are not named in the file). */
  constraints: z.array(subsystemConstraint).nullable(),
  claim: silClaim,
  spuriousTrip: spuriousTrip.nullable(),
  /** This solve first, then the latest succeeded solve of the same content by each other method. */
  methods: z.array(methodResult),
  notes: z.array(z.string()),
});
export type ResultAnalysis = z.infer<typeof resultAnalysis>;

export const RESULT_TABLES = ['curve', 'cut-sets', 'importance', 'contributions', 'constraints'] as const;
export const resultTable = z.enum(RESULT_TABLES, { message: `must be one of ${RESULT_TABLES.join(', ')}` });
export type ResultTable = z.infer<typeof resultTable>;

/** GET .../csv */
export const resultCsvQuery = z.object({ table: resultTable.default('curve') });
export type ResultCsvQuery = z.input<typeof resultCsvQuery>;

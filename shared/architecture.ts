import { z } from 'zod';
import { demandMode, modelItemId } from './model-file.js';

/**
 * A standard architecture to start a model from: voting groups of channels in series, each channel with
 * its failure rates, repair time and proof test, and beta-factor common cause per group. The generator
 * (solver/generator) writes both a Markov model and the equivalent fault tree from it.
 */

const rate = z.number().finite().nonnegative();
const positiveHours = z.number().finite().positive();
const fraction = z.number().finite().min(0).max(1);

export const architectureChannel = z.strictObject({
  /** Short id, unique in its group; default the channel's position (1, 2, ...). */
  id: modelItemId.optional(),
  label: z.string().max(200).optional(),
  lambdaDU: rate,
  lambdaDD: rate.optional(),
  /** Safe detected failures; only used by 1oo2D, where a detected fault takes the channel out (1oo1). */
  lambdaSD: rate.optional(),
  /** Mean time to restoration of a revealed failure (hours); 0 restores at once. */
  mttrHours: z.number().finite().nonnegative(),
  proofTest: z
    .strictObject({
      intervalHours: positiveHours,
      firstHours: positiveHours.optional(),
      coverage: fraction.optional(),
      /** Time the proof test takes (hours); the channel is out of service (failed) while it is tested. */
      durationHours: z.number().finite().nonnegative().optional(),
    })
    .optional(),
  /** Partial test (e.g. partial stroke): reveals the share `coverage` of DU failures at its own interval. */
  partialTest: z
    .strictObject({
      intervalHours: positiveHours,
      firstHours: positiveHours.optional(),
      coverage: fraction,
    })
    .optional(),
});
export type ArchitectureChannel = z.infer<typeof architectureChannel>;

export const VOTING_PATTERN = /^([1-9][0-9]*)oo([1-9][0-9]*)(D?)$/;

export const architectureGroup = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  /** M-out-of-N to act, e.g. "2oo3"; "1oo2D" for the diagnosed 1oo2 that degrades to 1oo1. */
  voting: z.string().regex(VOTING_PATTERN, 'voting is written MooN, e.g. "2oo3", or "1oo2D"'),
  channels: z.union([
    z.array(architectureChannel).min(1).max(8),
    z.strictObject({ identical: architectureChannel, count: z.number().int().min(1).max(8) }),
  ]),
  /** Beta factor of DU failures (IEC 61508-6 Annex D); default 0. */
  beta: fraction.optional(),
  /** Beta factor of DD failures; default beta, as in the fault-tree engine. */
  betaD: fraction.optional(),
  /**
   * "beta" (default): the shared rate is beta lambda; "pds": beta C_MooN lambda, the PDS method's
   * modification for the voting (SINTEF PDS method handbook, 2013), C_MooN from its table unless
   * `pdsFactor` gives it.
   */
  commonCauseModel: z.enum(['beta', 'pds']).optional(),
  /** C_MooN given explicitly (PDS method only), e.g. for a voting the table has no cell for. */
  pdsFactor: z.number().finite().nonnegative().optional(),
});
export type ArchitectureGroup = z.infer<typeof architectureGroup>;

export const architectureShape = z.strictObject({
  name: z.string().trim().min(1).max(200),
  description: z.string().max(5000).optional(),
  mission: z.strictObject({ hours: positiveHours, demand: demandMode }),
  /** Groups in series: the function fails when any group fails. */
  groups: z.array(architectureGroup).min(1).max(12),
  /** One repair crew for the whole function: one repair at a time (state model only). */
  sharedRepairCrew: z.boolean().optional(),
  /** Channel j of n is first tested at (j + 1) / n of its first test time, then at its interval. */
  staggeredTests: z.boolean().optional(),
});

/** The channels of a group, one entry per channel. */
export function groupChannels(group: ArchitectureGroup): ArchitectureChannel[] {
  return Array.isArray(group.channels) ? group.channels : Array.from({ length: group.channels.count }, () => (group.channels as { identical: ArchitectureChannel }).identical);
}

/** Parsed voting: M to act of N, k = N - M + 1 failures fail the group, diagnosed (1oo2D). */
export function parseVoting(voting: string): { m: number; n: number; k: number; diagnosed: boolean } | undefined {
  const match = VOTING_PATTERN.exec(voting);
  if (!match) return undefined;
  const m = Number(match[1]);
  const n = Number(match[2]);
  return { m, n, k: n - m + 1, diagnosed: match[3] === 'D' };
}

export const architecture = architectureShape.superRefine((value, context) => {
  const seenGroups = new Set<string>();
  value.groups.forEach((group, groupIndex) => {
    const path = ['groups', groupIndex];
    if (seenGroups.has(group.id)) context.addIssue({ code: 'custom', path: [...path, 'id'], message: `duplicate group id "${group.id}"` });
    seenGroups.add(group.id);
    const channels = groupChannels(group);
    const voting = parseVoting(group.voting);
    if (voting) {
      if (voting.n !== channels.length) {
        context.addIssue({ code: 'custom', path: [...path, 'voting'], message: `group "${group.id}": voting ${group.voting} needs ${voting.n} channels, the group has ${channels.length}` });
      }
      if (voting.m > voting.n) context.addIssue({ code: 'custom', path: [...path, 'voting'], message: `group "${group.id}": ${group.voting} asks for more channels to act than there are` });
      if (voting.diagnosed && (voting.m !== 1 || voting.n !== 2)) {
        context.addIssue({ code: 'custom', path: [...path, 'voting'], message: `group "${group.id}": the diagnosed voting "D" is only defined for 1oo2D` });
      }
    }
    if (group.pdsFactor !== undefined && group.commonCauseModel !== 'pds') {
      context.addIssue({ code: 'custom', path: [...path, 'pdsFactor'], message: `group "${group.id}": pdsFactor (C_MooN) is only used with commonCauseModel "pds"` });
    }
    const channelIds = new Set<string>();
    channels.forEach((channel, channelIndex) => {
      const channelPath = Array.isArray(group.channels) ? [...path, 'channels', channelIndex] : [...path, 'channels', 'identical'];
      const id = channel.id ?? String(channelIndex + 1);
      if (Array.isArray(group.channels) && channelIds.has(id)) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'id'], message: `group "${group.id}": duplicate channel id "${id}"` });
      }
      channelIds.add(id);
      if ((channel.lambdaSD ?? 0) > 0 && !voting?.diagnosed) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'lambdaSD'], message: `group "${group.id}": lambdaSD is only used by 1oo2D voting` });
      }
      if (((channel.lambdaDD ?? 0) > 0 || (channel.lambdaSD ?? 0) > 0) && channel.mttrHours === 0) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'mttrHours'], message: `group "${group.id}": detected failures need a repair time (mttrHours > 0)` });
      }
      const test = channel.proofTest;
      if (test && test.intervalHours > value.mission.hours) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'proofTest', 'intervalHours'], message: `group "${group.id}": the proof test interval ${test.intervalHours} h is longer than the mission (${value.mission.hours} h)` });
      }
      if (test?.firstHours !== undefined && test.firstHours > value.mission.hours) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'proofTest', 'firstHours'], message: `group "${group.id}": the first proof test at ${test.firstHours} h is after the mission end` });
      }
      if (test?.durationHours !== undefined && test.durationHours >= test.intervalHours) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'proofTest', 'durationHours'], message: `group "${group.id}": the proof test lasts ${test.durationHours} h, as long as its interval or longer` });
      }
      const partial = channel.partialTest;
      if (partial && partial.intervalHours > value.mission.hours) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'partialTest', 'intervalHours'], message: `group "${group.id}": the partial test interval ${partial.intervalHours} h is longer than the mission (${value.mission.hours} h)` });
      }
      if (partial?.firstHours !== undefined && partial.firstHours > value.mission.hours) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'partialTest', 'firstHours'], message: `group "${group.id}": the first partial test at ${partial.firstHours} h is after the mission end` });
      }
      if (partial && test && partial.coverage > (test.coverage ?? 1)) {
        context.addIssue({ code: 'custom', path: [...channelPath, 'partialTest', 'coverage'], message: `group "${group.id}": the partial test coverage ${partial.coverage} is above the proof test coverage ${test.coverage ?? 1} (the proof test reveals everything the partial test reveals)` });
      }
    });
  });
});
export type Architecture = z.infer<typeof architectureShape>;

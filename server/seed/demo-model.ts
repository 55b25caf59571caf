import { and, eq } from 'drizzle-orm';
import type { FaultTreeModel, RateEvent } from '../../shared/model-file.js';
import type { Database } from '../db/client.js';
import { models } from '../db/schema/models.js';
import { sifs } from '../db/schema/sifs.js';
import { users } from '../db/schema/users.js';

type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0];

/** Tag of the demo SIF that gets the demo model. */
export const DEMO_MODEL_SIF_TAG = 'PZT-1101';

const YEAR = 8760;

/**
 * The demo function: inlet separator V-110 high-pressure shutdown, as a fault tree. Three pressure
 * transmitters voting 2oo3 with a beta factor, one logic solver, two shutdown valves 1oo2 with a
 * partial stroke test every quarter. Tags, devices and every figure are invented.
 */
export const DEMO_MODEL: FaultTreeModel = {
  format: 'proofline/model',
  version: 1,
  name: 'PZT-1101 high-pressure shutdown (demo)',
  description: 'Invented demo figures; not data of any real device.',
  kind: 'fault-tree',
  mission: { hours: 10 * YEAR, demand: 'low' },
  events: (['A', 'B', 'C'] as const)
    .map((channel): RateEvent => ({
      id: `PT-1101${channel}`,
      label: `Pressure transmitter ${channel}`,
      lambdaDU: 3.0e-7,
      lambdaDD: 1.2e-6,
      lambdaS: 1.0e-6,
      mttrHours: 8,
      deviceType: 'B' as const,
      systematicCapability: 3,
      errorFactor: 3,
      source: 'invented demo figure (transmitter data sheet style)',
      proofTest: { intervalHours: YEAR, coverage: 0.95 },
    }))
    .concat([
      {
        id: 'LS-110',
        label: 'Safety logic solver',
        lambdaDU: 5.0e-9,
        lambdaDD: 4.95e-7,
        lambdaS: 5.0e-7,
        mttrHours: 8,
        deviceType: 'B' as const,
        systematicCapability: 3,
        errorFactor: 3,
        source: 'invented demo figure (logic solver certificate style)',
        proofTest: { intervalHours: YEAR, coverage: 0.95 },
      },
    ])
    .concat(
      (['A', 'B'] as const).map((channel): RateEvent => ({
        id: `XV-1101${channel}`,
        label: `Shutdown valve ${channel} with actuator`,
        lambdaDU: 1.6e-6,
        lambdaDD: 0,
        lambdaS: 8.0e-7,
        mttrHours: 24,
        deviceType: 'A' as const,
        systematicCapability: 3,
        errorFactor: 5,
        source: 'invented demo figure (valve and actuator data style)',
        proofTest: { intervalHours: YEAR, coverage: 0.9 },
        partialTest: { intervalHours: YEAR / 4, coverage: 0.6 },
      })),
    ),
  gates: [
    { id: 'SIF-FAILS', label: 'Shutdown fails on demand', type: 'or', inputs: ['SENSORS', 'LS-110', 'VALVES'] },
    { id: 'SENSORS', label: 'Transmitters 2oo3', type: 'atLeast', k: 2, inputs: ['PT-1101A', 'PT-1101B', 'PT-1101C'] },
    { id: 'VALVES', label: 'Shutdown valves 1oo2', type: 'and', inputs: ['XV-1101A', 'XV-1101B'] },
  ],
  ccf: [
    { id: 'CCF-PT', label: 'Transmitters common cause', members: ['PT-1101A', 'PT-1101B', 'PT-1101C'], beta: 0.05, model: 'beta', source: 'invented demo figure' },
    { id: 'CCF-XV', label: 'Valves common cause', members: ['XV-1101A', 'XV-1101B'], beta: 0.1, model: 'beta', source: 'invented demo figure' },
  ],
  top: 'SIF-FAILS',
};

/** Adds the demo model to the demo SIF, inside the seed's transaction (the seed runs only on an empty database). */
export async function seedDemoModel(tx: Transaction): Promise<void> {
  const [sif] = await tx.select({ id: sifs.id, projectId: sifs.projectId }).from(sifs).where(eq(sifs.tag, DEMO_MODEL_SIF_TAG));
  const [engineer] = await tx.select({ id: users.id }).from(users).where(and(eq(users.username, 'engineer')));
  if (!sif || !engineer) throw new Error(`the demo model needs SIF ${DEMO_MODEL_SIF_TAG} and the demo engineer`);
  await tx.insert(models).values({
    projectId: sif.projectId,
    sifId: sif.id,
    name: DEMO_MODEL.name,
    kind: DEMO_MODEL.kind,
    draftContent: DEMO_MODEL as unknown as Record<string, unknown>,
    draftIssues: [],
    draftUpdatedById: engineer.id,
    createdById: engineer.id,
  });
}

import { describe, expect, it } from 'vitest';
import { architecture } from '../../../shared/architecture.js';
import { modelFile, type RateEvent } from '../../../shared/model-file.js';
import { generateModels } from '../../../solver/generator/index.js';
import { deviceVersionFixture } from '../devices/device-fixtures';
import { linkGeneratedEvents } from './wizard-links';

const VERSION = deviceVersionFixture({ version: 3 });

function generated(voting: string, count: number) {
  return generateModels(
    architecture.parse({
      name: 'Links (invented)',
      mission: { hours: 87_600, demand: 'low' },
      groups: [
        { id: 'PT', voting, channels: { identical: { lambdaDU: 4e-8, lambdaDD: 3.6e-7, lambdaSD: voting.endsWith('D') ? 1e-6 : undefined, mttrHours: 8, proofTest: { intervalHours: 8760, coverage: 0.9 } }, count }, beta: 0.05 },
        { id: 'XV', voting: '1oo1', channels: { identical: { lambdaDU: 2e-6, mttrHours: 8 }, count: 1 } },
      ],
    }),
  ).faultTree;
}

describe('linking the generated fault tree', () => {
  it('links every channel event of a linked subsystem and no other, and the file stays valid', () => {
    const tree = linkGeneratedEvents(generated('2oo3', 3), new Map([['PT', { version: VERSION, overrides: [] }]]));
    const linked = tree.events.filter((event) => (event as RateEvent).device !== undefined).map((event) => event.id);
    expect(linked).toEqual(['PT-1', 'PT-2', 'PT-3']);
    expect((tree.events[0] as RateEvent).device).toEqual({ id: VERSION.deviceId, version: 3 });
    expect(modelFile.safeParse(tree).success).toBe(true);
  });

  it('links the channel event of a 1oo2D channel, not its safe-detected take-out, and keeps overrides', () => {
    const tree = linkGeneratedEvents(generated('1oo2D', 2), new Map([['PT', { version: VERSION, overrides: [{ field: 'proofTest.coverage', reason: 'Valve seat not tested (invented)' }] }]]));
    const byId = new Map(tree.events.map((event) => [event.id, event as RateEvent]));
    expect(byId.get('PT-1')?.device?.overrides).toEqual([{ field: 'proofTest.coverage', reason: 'Valve seat not tested (invented)' }]);
    // The override keeps the wizard's coverage (0.9 here, also the library's, so the value is unchanged).
    expect(byId.get('PT-1')?.proofTest?.coverage).toBe(0.9);
    expect(byId.get('PT-1-SD')?.device).toBeUndefined();
    expect(byId.get('PT-2')?.device?.version).toBe(3);
  });

  it('leaves a tree without links as it is', () => {
    const tree = generated('1oo2', 2);
    expect(linkGeneratedEvents(tree, new Map())).toBe(tree);
  });
});

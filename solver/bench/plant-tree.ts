import type { BasicEvent, CommonCauseGroup, FaultTreeModel, Gate } from '../../shared/model-file.js';

/** Small seeded generator (mulberry32), so every benchmark run solves the same trees. */
function random(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface PlantTreeOptions {
  /** Number of basic events to reach (about). */
  readonly events: number;
  readonly seed?: number;
  /** Share of channels that also depend on their train's power feeder. Default 0.3. */
  readonly supportShare?: number;
  /** Share of channels that also depend on a site-wide support. Default 0.02. */
  readonly siteShare?: number;
}

/**
 * A generated plant-like fault tree of an invented process plant: voting groups of 2-6 channels (each
 * channel a sensor or valve with DU/DD rates plus an I/O card, often a trip relay, sometimes a shared
 * support), beta-factor
 * groups over each group's devices, staggered proof tests on monthly slots, partial stroke tests on valves,
 * groups combined into trains and units. Figures are invented.
 */
export function plantTree(options: PlantTreeOptions): FaultTreeModel {
  const next = random(options.seed ?? 7);
  const pick = <T>(items: readonly T[]) => items[Math.floor(next() * items.length)];
  const events: BasicEvent[] = [];
  const gates: Gate[] = [];
  const ccf: CommonCauseGroup[] = [];
  // Site-wide supports (a main UPS, the instrument air compressor) and one power feeder per train of
  // four groups: shared events, but local ones, as on a real plant.
  const siteSupports = ['SITE-UPS', 'SITE-AIR'];
  events.push(
    { id: 'SITE-UPS', label: 'Main UPS output lost', lambdaDU: 1e-8, lambdaDD: 5e-7, mttrHours: 4, proofTest: { intervalHours: 17520, firstHours: 8760 } },
    { id: 'SITE-AIR', label: 'Instrument air lost', probability: 2e-5 },
  );
  const feederOf = (group: number) => `FEEDER-${Math.ceil(group / 4)}`;
  const ensureFeeder = (group: number) => {
    const id = feederOf(group);
    if (!events.some((event) => event.id === id)) {
      events.push({ id, label: `Power feeder of train ${Math.ceil(group / 4)}`, lambdaDU: 2e-8, lambdaDD: 1e-6, mttrHours: 4, proofTest: { intervalHours: 17520, firstHours: 730 * (1 + (Math.ceil(group / 4) % 24)) } });
    }
    return id;
  };
  const groupIds: string[] = [];
  let group = 0;
  while (events.length < options.events) {
    group++;
    const n = 2 + Math.floor(next() * 5);
    const k = Math.min(n, 1 + Math.floor(next() * n) + (n > 2 ? 1 : 0));
    const valve = next() < 0.3;
    const interval = pick([4380, 8760, 17520]);
    const lambdaDU = (valve ? 1e-6 : 2e-7) * (0.5 + next());
    const lambdaDD = valve ? 0 : 1e-6 * (0.5 + next());
    const devices: string[] = [];
    const channels: string[] = [];
    for (let c = 0; c < n; c++) {
      const device = `G${group}-D${c + 1}`;
      const card = `G${group}-IO${c + 1}`;
      const channel = `G${group}-CH${c + 1}`;
      const slot = 730 * Math.max(1, Math.round((interval / 730) * ((c + 1) / n)));
      events.push({
        id: device,
        lambdaDU,
        lambdaDD,
        mttrHours: 8,
        proofTest: { intervalHours: interval, firstHours: Math.min(slot, interval), coverage: valve ? 0.9 : 0.98, durationHours: valve ? 0 : 2 },
        ...(valve ? { partialTest: { intervalHours: 730, firstHours: 730, coverage: 0.6 } } : {}),
      });
      events.push({ id: card, lambdaDU: 5e-9, lambdaDD: 2e-7, mttrHours: 8, proofTest: { intervalHours: 17520, firstHours: 17520 } });
      const inputs = [device, card];
      if (next() < 0.6) {
        const relay = `G${group}-RL${c + 1}`;
        events.push({ id: relay, lambdaDU: 2e-8, lambdaDD: 1e-7, mttrHours: 8, proofTest: { intervalHours: interval, firstHours: Math.min(slot, interval) } });
        inputs.push(relay);
      }
      if (next() < (options.supportShare ?? 0.3)) inputs.push(ensureFeeder(group));
      if (next() < (options.siteShare ?? 0.02)) inputs.push(pick(siteSupports));
      gates.push({ id: channel, type: 'or', inputs });
      devices.push(device);
      channels.push(channel);
    }
    ccf.push({ id: `G${group}-CCF`, members: devices, beta: 0.05, betaD: 0.02, model: 'beta' });
    const groupId = `G${group}`;
    gates.push({ id: groupId, type: 'atLeast', k, inputs: channels });
    groupIds.push(groupId);
  }
  // Four groups make a train; two trains in parallel make a unit when there are enough; units in series.
  const trains: string[] = [];
  for (let i = 0; i < groupIds.length; i += 4) {
    const id = `TRAIN-${trains.length + 1}`;
    gates.push({ id, type: 'or', inputs: groupIds.slice(i, i + 4) });
    trains.push(id);
  }
  const units: string[] = [];
  for (let i = 0; i < trains.length; i += 2) {
    const id = `UNIT-${units.length + 1}`;
    const inputs = trains.slice(i, i + 2);
    gates.push({ id, type: inputs.length === 2 ? 'and' : 'or', inputs });
    units.push(id);
  }
  gates.push({ id: 'TOP', label: 'Plant protection fails on demand', type: 'or', inputs: units });
  return {
    format: 'proofline/model',
    version: 1,
    name: `Generated plant tree, ${events.length} events`,
    kind: 'fault-tree',
    mission: { hours: 87600, demand: 'low' },
    events,
    gates,
    ccf,
    top: 'TOP',
  };
}

/**
 * A hard tree: many events shared across the whole tree (every gate draws from one common pool), the
 * case where no variable order keeps the diagram small.
 */
export function sharedPoolTree(options: { events: number; gates: number; seed?: number }): FaultTreeModel {
  const next = random(options.seed ?? 11);
  const events: BasicEvent[] = Array.from({ length: options.events }, (_, i) => ({ id: `P${i + 1}`, probability: 1e-3 * (1 + next()) }));
  const gates: Gate[] = [];
  for (let g = 0; g < options.gates; g++) {
    const inputs = new Set<string>();
    while (inputs.size < 4) inputs.add(`P${1 + Math.floor(next() * options.events)}`);
    gates.push({ id: `V${g + 1}`, type: 'atLeast', k: 2, inputs: [...inputs] });
  }
  gates.push({ id: 'TOP', type: 'and', inputs: gates.map((item) => item.id).filter((_, index) => index % 2 === 0).slice(0, 40) });
  gates.push({ id: 'TOP2', type: 'or', inputs: ['TOP', ...gates.map((item) => item.id).filter((_, index) => index % 2 === 1)] });
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Shared-pool hard tree',
    kind: 'fault-tree',
    mission: { hours: 8760, demand: 'low' },
    events,
    gates,
    top: 'TOP2',
  };
}

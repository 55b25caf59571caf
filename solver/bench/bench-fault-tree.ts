import { kronrodOnPartition } from '../common/quadrature.js';
import { FaultTreeEngine } from '../fault-tree/engine.js';
import { forwardPass, variableMatrix } from '../fault-tree/evaluate.js';
import { votedGroup } from '../fault-tree/test-models.js';
import { solveModel } from '../index.js';
import { plantTree, sharedPoolTree } from './plant-tree.js';

/**
 * Benchmark of the exact fault-tree engine (prints figures; no pass/fail). Targets from issue 3:
 * 2,000-event plant tree at 10,000 time points: PFD(t) + PFDavg under 0.3 s, PFH under 0.6 s; a
 * 4,000-event tree under twice that; 1oo2 / 2oo3 / 2oo4 models in under 5 ms; a hard tree within 5 s.
 */
const seconds = (start: number) => ((performance.now() - start) / 1000).toFixed(3);
const megabytes = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(0)} MB`;

function plant(events: number): void {
  const model = plantTree({ events });
  const groups = model.gates.filter((gate) => gate.type === 'atLeast').length;
  let start = performance.now();
  const engine = new FaultTreeEngine(model);
  const build = seconds(start);
  start = performance.now();
  const curve = engine.curve(10_000);
  const average = engine.pfdAverage();
  const pfd = seconds(start);
  start = performance.now();
  const rule = kronrodOnPartition(average.partition);
  const frequency = engine.frequencyAndImportance(rule);
  const pfh = seconds(start);
  start = performance.now();
  const cutSets = engine.cutSets(engine.meanUnavailability(), { cutoff: 1e-8 * average.pfdAvg });
  const cut = seconds(start);
  const memory = process.memoryUsage();
  console.log(`plant tree: ${model.events.length} events, ${model.gates.length} gates, ${groups} voting groups, ${model.ccf?.length ?? 0} CCF groups`);
  console.log(`  BDD ${engine.diagram.size} nodes over ${engine.variables.variables.length} variables, built in ${build} s`);
  console.log(`  PFD(t) at ${curve.hours.length} points (10,000 + breakpoints) + PFDavg (${average.partition.length - 1} Gauss-Kronrod intervals over ${engine.edges.length - 1} breakpoint segments, rel. error ${average.relativeError.toExponential(1)}): ${pfd} s`);
  console.log(`  PFH + every Birnbaum importance (${rule.times.length} quadrature times, rel. error ${frequency.relativeError.toExponential(1)}): ${pfh} s`);
  console.log(`  minimal cut sets (order <= ${cutSets.maxOrder}, mean product >= ${cutSets.cutoff.toExponential(1)}): ${cutSets.sets.length} in ${cut} s`);
  console.log(`  PFDavg ${average.pfdAvg.toExponential(4)}, PFH ${frequency.pfh.toExponential(4)} /h; memory rss ${megabytes(memory.rss)}, heap ${megabytes(memory.heapUsed)}`);
  // The machine's speed on a plain pass over this diagram, to compare with the 2.5-3e8 per second.
  const probe = new Float64Array(256).map((_, index) => (index + 0.5) * (model.mission.hours / 256));
  const { q } = variableMatrix(engine.variables.rows, probe, false);
  const values = new Float64Array(engine.diagram.size * probe.length);
  forwardPass(engine.diagram, q, probe.length, values);
  start = performance.now();
  const passes = 10;
  for (let i = 0; i < passes; i++) forwardPass(engine.diagram, q, probe.length, values);
  const rate = (passes * engine.diagram.size * probe.length) / ((performance.now() - start) / 1000);
  console.log(`  this machine now: ${rate.toExponential(2)} node evaluations per second (plain forward pass)`);
  start = performance.now();
  solveModel(model, { timePoints: 10_000 });
  console.log(`  whole solveModel (with cut sets, importance, simplified formulas): ${seconds(start)} s`);
}

function small(): void {
  const cases: [string, number, number][] = [
    ['1oo2', 2, 2],
    ['2oo3', 3, 2],
    ['2oo4', 4, 3],
  ];
  for (const [name, n, k] of cases) {
    const model = votedGroup(n, k, { lambdaDU: 5e-7, lambdaDD: 1e-6, mttrHours: 8, intervalHours: 8760, missionHours: 87600, beta: 0.05, stagger: true });
    for (let i = 0; i < 20; i++) solveModel(model);
    const runs = 50;
    const start = performance.now();
    for (let i = 0; i < runs; i++) solveModel(model);
    console.log(`${name} (staggered, beta, MTTR, 1,000 points): ${((performance.now() - start) / runs).toFixed(2)} ms per solve`);
  }
}

function hard(): void {
  const model = sharedPoolTree({ events: 60, gates: 120 });
  const start = performance.now();
  try {
    const result = solveModel(model, { timePoints: 200 });
    console.log(`hard tree (60 events shared by 120 voting gates): ${seconds(start)} s, ${result.algorithm}; PFDavg ${result.pfdAvg.toExponential(3)}`);
    for (const warning of result.warnings) console.log(`  warning: ${warning}`);
  } catch (error) {
    console.log(`hard tree (60 events shared by 120 voting gates): stopped after ${seconds(start)} s: ${(error as Error).message}`);
  }
}

small();
plant(2000);
plant(4000);
hard();

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

/** The reference speed of a plain typed-array BDD pass on this kind of machine (issue 3: 2.5-3e8 per second). */
const REFERENCE_RATE = 2.75e8;

/**
 * The machine's speed right now on a plain forward pass over this diagram (node evaluations per second),
 * measured beside each figure because the load of a shared machine changes from one stage to the next.
 */
function calibrate(engine: FaultTreeEngine, missionHours: number): number {
  const probe = new Float64Array(256).map((_, index) => (index + 0.5) * (missionHours / 256));
  const { q } = variableMatrix(engine.variables.rows, probe, false);
  const values = new Float64Array(engine.diagram.size * probe.length);
  forwardPass(engine.diagram, q, probe.length, values);
  const start = performance.now();
  const passes = 5;
  for (let i = 0; i < passes; i++) forwardPass(engine.diagram, q, probe.length, values);
  return (passes * engine.diagram.size * probe.length) / ((performance.now() - start) / 1000);
}

/** A stage's time, the calibration measured just after it, and the time scaled to the reference speed. */
function timed<T>(engine: FaultTreeEngine, missionHours: number, run: () => T): { value: T; figure: string } {
  const start = performance.now();
  const value = run();
  const elapsed = (performance.now() - start) / 1000;
  const rate = calibrate(engine, missionHours);
  return { value, figure: `${elapsed.toFixed(3)} s [machine ${rate.toExponential(2)} node evals/s; ${((elapsed * rate) / REFERENCE_RATE).toFixed(3)} s at ${REFERENCE_RATE.toExponential(2)}/s]` };
}

function plant(events: number): void {
  const model = plantTree({ events });
  const mission = model.mission.hours;
  const groups = model.gates.filter((gate) => gate.type === 'atLeast').length;
  const start = performance.now();
  const engine = new FaultTreeEngine(model);
  const buildSeconds = (performance.now() - start) / 1000;
  const buildRate = calibrate(engine, mission);
  const build = `${buildSeconds.toFixed(3)} s [machine ${buildRate.toExponential(2)} node evals/s]`;
  const curve = timed(engine, mission, () => engine.curve(10_000));
  const shared = timed(engine, mission, () => engine.averages());
  const average = shared.value;
  const reference = timed(engine, mission, () => engine.pfdAverage());
  const separate = timed(engine, mission, () => engine.frequencyAndImportance(kronrodOnPartition(reference.value.partition)));
  const cutSets = timed(engine, mission, () => engine.cutSets(engine.meanUnavailability(), { cutoff: 1e-8 * average.pfdAvg }));
  const memory = process.memoryUsage();
  console.log(`plant tree: ${model.events.length} events, ${model.gates.length} gates, ${groups} voting groups, ${model.ccf?.length ?? 0} CCF groups`);
  console.log(`  BDD ${engine.diagram.size} nodes over ${engine.variables.variables.length} variables (${engine.variables.rows.length} distinct timelines), built in ${build}`);
  console.log(`  PFD(t) at ${curve.value.hours.length} points (10,000 + breakpoints): ${curve.figure}`);
  console.log(
    `  PFDavg + PFH + every Birnbaum importance, one shared pass (${average.rule.times.length} quadrature times on ${average.partition.length - 1} Gauss-Kronrod intervals over ${engine.edges.length - 1} breakpoint segments, PFDavg rel. error ${average.pfdRelativeError.toExponential(1)}, PFH ${average.relativeError.toExponential(1)}): ${shared.figure}`,
  );
  console.log(`  the same by the separate passes: adaptive PFDavg ${reference.figure}; PFH + importance ${separate.figure}`);
  console.log(`  minimal cut sets (order <= ${cutSets.value.maxOrder}, mean product >= ${cutSets.value.cutoff.toExponential(1)}): ${cutSets.value.sets.length} in ${cutSets.figure}`);
  console.log(`  PFDavg ${average.pfdAvg.toExponential(4)}, PFH ${average.pfh.toExponential(4)} /h; memory rss ${megabytes(memory.rss)}, heap ${megabytes(memory.heapUsed)}`);
  const whole = timed(engine, mission, () => solveModel(model, { timePoints: 10_000 }));
  console.log(`  whole solveModel (with cut sets, importance, simplified formulas): ${whole.figure}`);
}

function small(calibration: FaultTreeEngine, missionHours: number): void {
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
    const milliseconds = (performance.now() - start) / runs;
    const rate = calibrate(calibration, missionHours);
    console.log(
      `${name} (staggered, beta, MTTR, 1,000 points): ${milliseconds.toFixed(2)} ms per solve [machine ${rate.toExponential(2)} node evals/s; ${((milliseconds * rate) / REFERENCE_RATE).toFixed(2)} ms at ${REFERENCE_RATE.toExponential(2)}/s]`,
    );
  }
}

function hard(calibration: FaultTreeEngine, missionHours: number): void {
  const model = sharedPoolTree({ events: 60, gates: 120 });
  const start = performance.now();
  try {
    const result = solveModel(model, { timePoints: 200 });
    const elapsed = seconds(start);
    console.log(`hard tree (60 events shared by 120 voting gates): ${elapsed} s [machine ${calibrate(calibration, missionHours).toExponential(2)} node evals/s], ${result.algorithm}; PFDavg ${result.pfdAvg.toExponential(3)}`);
    for (const warning of result.warnings) console.log(`  warning: ${warning}`);
  } catch (error) {
    console.log(`hard tree (60 events shared by 120 voting gates): stopped after ${seconds(start)} s: ${(error as Error).message}`);
  }
}

// The small models' and the hard tree's own diagrams are too small or too odd to measure the machine on:
// the 2,000-event plant diagram serves as their calibration.
const calibrationModel = plantTree({ events: 2000 });
const calibration = new FaultTreeEngine(calibrationModel);
small(calibration, calibrationModel.mission.hours);
plant(2000);
plant(4000);
hard(calibration, calibrationModel.mission.hours);

import { availableParallelism, loadavg } from 'node:os';
import { expm as mathjsExpm, matrix } from 'mathjs';
import type { Architecture } from '../../shared/architecture.js';
import { markovIssues, type FaultTreeModel, type MarkovModel, type MarkovTransition } from '../../shared/model-file.js';
import { generateModels } from '../generator/index.js';
import { expm, solveMarkovModel } from '../markov/index.js';
import { simulateFaultTreeModel } from '../montecarlo/index.js';
import { createRandomStream } from '../random/index.js';

/**
 * Benchmark of the Markov engine and the Monte Carlo simulator (prints figures; no pass/fail). Targets
 * from issue 4, on one core: three independent voting groups (2oo3 + 1oo2 + 1oo2, DU/DD/CCF/repair, 10
 * years, 40 proof tests, 1,000 points) under 10 ms, the same as one dependent chain (shared repair crew)
 * under 2 s; a 100,000-state sparse chain (about 3e5 entries, qT about 1,750 per year, 40 phases, 1,000
 * points) under 2.5 s and 64 MB; at 256 states PFD(t) at 1,000 points 150x faster than mathjs expm and
 * 20x faster than a dense exponential; Monte Carlo samples per second and the interval width after 10 s.
 * BENCH_ONLY=groups|crew|generator|dense|sparse|montecarlo runs one case.
 */
const YEAR = 8760;
const MISSION = 10 * YEAR;
const milliseconds = (start: number) => performance.now() - start;
const format = (value: number) => (value < 10 ? value.toFixed(2) : value.toFixed(0));

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

/** The issue's three groups; a proof test coverage below 1 adds the condition "DU not covered". */
function threeGroups(sharedRepairCrew: boolean, coverage = 1): Architecture {
  const channel = (lambdaDU: number, lambdaDD: number) => ({ lambdaDU, lambdaDD, mttrHours: 8, proofTest: { intervalHours: MISSION / 40, coverage } });
  return {
    name: 'Export header trip: transmitters, level switches, valves',
    mission: { hours: MISSION, demand: 'low' },
    sharedRepairCrew,
    groups: [
      { id: 'PT', voting: '2oo3', beta: 0.05, betaD: 0.02, channels: { identical: channel(5e-7, 2e-6), count: 3 } },
      { id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel(1e-6, 3e-6), count: 2 } },
      { id: 'XV', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel(2e-6, 1e-6), count: 2 } },
    ],
  };
}

function independentGroups(): void {
  const { markov } = generateModels(threeGroups(false));
  const sizes = [markov.states.length, ...(markov.parts ?? []).map((part) => part.states.length)];
  const speed = calibrate();
  const times: number[] = [];
  let result = solveMarkovModel(markov, { includeStates: false });
  for (let run = 0; run < 30; run += 1) {
    const start = performance.now();
    result = solveMarkovModel(markov, { includeStates: false });
    times.push(milliseconds(start));
  }
  const start = performance.now();
  solveMarkovModel(markov, {});
  const withStates = milliseconds(start);
  console.log(`three independent groups (2oo3 + 1oo2 + 1oo2), parts of ${sizes.join(' + ')} states, 40 tests, ${result.curve.hours.length} curve points:`);
  console.log(`  PFD(t) + PFDavg + PFH: median ${format(median(times))} ms of 30 warm runs (min ${format(Math.min(...times))} ms); with every state's probability listed ${format(withStates)} ms; calibration ${speed.toFixed(1)} ns per sparse entry   [target < 10 ms]`);
  console.log(`  PFDavg ${result.pfdAvg.toExponential(4)}, PFH ${result.pfh.toExponential(4)} /h`);
}

/**
 * The same groups with one shared repair crew, as one dependent chain of lumped identical channels. With
 * full proof test coverage a channel is ok, DU hidden or under repair (360 states); with coverage 0.9 also
 * DU not covered, which gives the issue's 2,000-state chain (20 x 10 x 10 counted channel conditions).
 */
function dependentChain(coverage: number): void {
  const generations: number[] = [];
  let markov = generateModels(threeGroups(true, coverage)).markov;
  for (let run = 0; run < 3; run += 1) {
    const start = performance.now();
    markov = generateModels(threeGroups(true, coverage)).markov;
    generations.push(milliseconds(start));
  }
  const speed = calibrate();
  const checks: number[] = [];
  for (let run = 0; run < 3; run += 1) {
    const start = performance.now();
    markovIssues(markov);
    checks.push(milliseconds(start));
  }
  let result = solveMarkovModel(markov, { includeStates: false });
  const solves: number[] = [];
  for (let run = 0; run < 3; run += 1) {
    const start = performance.now();
    result = solveMarkovModel(markov, { includeStates: false });
    solves.push(milliseconds(start));
  }
  console.log(`same groups (proof test coverage ${coverage}) with one shared repair crew: one chain of ${markov.states.length} states, ${markov.transitions.length} transitions`);
  console.log(`  generated in best of 3 ${format(Math.min(...generations))} ms; reference checks (markovIssues) best of 3 ${format(Math.min(...checks))} ms`);
  console.log(`  solved in best of 3 ${scaled(Math.min(...solves), speed)}   [target < 2,000 ms]: ${result.algorithm}`);
  console.log(`  PFDavg ${result.pfdAvg.toExponential(4)}, PFH ${result.pfh.toExponential(4)} /h, stated relative error bound ${result.errorBound?.toExponential(1)}`);
}

/** Generation of a large state model: a 4oo7 of seven different channels with common cause, one chain. */
function largeGeneration(): void {
  const channels = Array.from({ length: 7 }, (_, index) => ({ lambdaDU: 1e-6 * (1 + index / 10), lambdaDD: 2e-6, mttrHours: 8, proofTest: { intervalHours: YEAR, coverage: 0.9 } }));
  const spec: Architecture = { name: 'Seven different channels', mission: { hours: MISSION, demand: 'low' }, groups: [{ id: 'G', voting: '4oo7', beta: 0.05, channels }] };
  const times: number[] = [];
  let markov = generateModels(spec).markov;
  for (let run = 0; run < 3; run += 1) {
    const start = performance.now();
    markov = generateModels(spec).markov;
    times.push(milliseconds(start));
  }
  console.log(`generator, 4oo7 of different channels with common cause: ${markov.states.length.toLocaleString('en-US')} states, ${markov.transitions.length.toLocaleString('en-US')} transitions written in best of 3 ${format(Math.min(...times))} ms`);
}

/**
 * A synthetic sparse safety-like chain: each state fails slowly to the next state and most are repaired
 * fast (0.2 per hour, the stiffness of the issue's figure qT = 1,750 per year); every fourth state holds a
 * hidden failure that the quarterly proof test sends to repair; one state in four is down.
 */
function sparseChain(size: number): MarkovModel {
  const random = createRandomStream(17);
  const id = (index: number) => `S${index}`;
  const transitions: MarkovTransition[] = [];
  for (let index = 0; index < size; index += 1) {
    transitions.push({ from: id(index), to: id((index + 1) % size), rate: 1e-5 + 1e-4 * random.next() });
    if (index % 4 !== 2 && index > 0) transitions.push({ from: id(index), to: id(Math.floor(random.next() * index)), rate: 0.1 + 0.1 * random.next() });
  }
  const moves = [];
  for (let index = 2; index < size; index += 4) moves.push({ from: id(index), to: id(index + 1), probability: 1 });
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Sparse benchmark chain',
    kind: 'markov',
    mission: { hours: MISSION, demand: 'low' },
    states: Array.from({ length: size }, (_, index) => ({ id: id(index), ...(index === 0 ? { initial: 1 } : {}), ...(index % 4 === 3 ? { down: true } : {}) })),
    transitions,
    tests: [{ intervalHours: MISSION / 40, moves }],
  };
}

function largeSparse(): void {
  const chain = sparseChain(100_000);
  const maxRate = chain.transitions.reduce((best, transition) => Math.max(best, transition.rate), 0);
  const speed = calibrate();
  global.gc?.();
  const before = process.memoryUsage();
  let start = performance.now();
  const result = solveMarkovModel(chain, { includeStates: false });
  const times = [milliseconds(start)];
  const after = process.memoryUsage();
  for (let run = 0; run < 2; run += 1) {
    start = performance.now();
    solveMarkovModel(chain, { includeStates: false });
    times.push(milliseconds(start));
  }
  const solved = Math.min(...times);
  console.log(`sparse chain: ${chain.states.length} states, ${chain.transitions.length + chain.states.length} generator entries, largest rate ${maxRate.toFixed(3)} /h (qT about ${(maxRate * YEAR).toFixed(0)} per year), 40 test phases, ${result.curve.hours.length} points:`);
  console.log(`  solved in best of 3 ${scaled(solved, speed)}   [target < 2,500 ms]: ${result.algorithm}`);
  console.log(`  memory: rss ${((after.rss - before.rss) / 2 ** 20).toFixed(0)} MB more after the first solve, heap ${((after.heapUsed - before.heapUsed) / 2 ** 20).toFixed(0)} MB more, array buffers ${((after.arrayBuffers - before.arrayBuffers) / 2 ** 20).toFixed(0)} MB more, max rss of the process ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB (the model objects alone take a large share)   [target < 64 MB]`);
  console.log(`  PFDavg ${result.pfdAvg.toExponential(4)}, stated relative error bound ${result.errorBound?.toExponential(1)}`);
}

/** A 2oo4 of four staggered channels (ok, DU hidden, not covered, repair): 256 states. */
function mediumChain(): MarkovModel {
  const { markov } = generateModels({
    name: 'Staggered 2oo4',
    mission: { hours: MISSION, demand: 'low' },
    staggeredTests: true,
    groups: [{ id: 'FT', voting: '2oo4', channels: { identical: { lambdaDU: 2e-6, lambdaDD: 5e-6, mttrHours: 72, proofTest: { intervalHours: YEAR, coverage: 0.9 } }, count: 4 } }],
  });
  return markov;
}

function versusDense(): void {
  const chain = mediumChain();
  const n = chain.states.length;
  const index = new Map(chain.states.map((state, position) => [state.id, position]));
  const step = MISSION / 1000;
  const q = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (const transition of chain.transitions) {
    const from = index.get(transition.from)!;
    q[from][index.get(transition.to)!] += transition.rate * step;
    q[from][from] -= transition.rate * step;
  }
  solveMarkovModel(chain, { includeStates: false });
  const speed = calibrate();
  let start = performance.now();
  const result = solveMarkovModel(chain, { includeStates: false });
  const engine = milliseconds(start);
  start = performance.now();
  mathjsExpm(matrix(q));
  const mathjs = milliseconds(start);
  const flat = Float64Array.from(q.flat());
  start = performance.now();
  expm(flat, n);
  const pade = milliseconds(start);
  console.log(`${n}-state chain (staggered 2oo4, ${chain.transitions.length} transitions), PFD(t) at ${result.curve.hours.length} points:`);
  console.log(`  engine ${format(engine)} ms at ${speed.toFixed(1)} ns per sparse entry (${result.algorithm.split(':')[1]?.split(';')[0]?.trim()})`);
  console.log(`  one mathjs expm of the generator: ${format(mathjs)} ms; one per output point (x 1,000): engine ${format((mathjs * 1000) / engine)}x faster   [target 150x]; than a single call: ${format(mathjs / engine)}x`);
  console.log(`  one typed-array Pade-13 exponential: ${format(pade)} ms; one per output point (x 1,000): engine ${format((pade * 1000) / engine)}x faster   [target 20x]; than a single call: ${format(pade / engine)}x`);
}

function monteCarlo(): void {
  const { faultTree } = generateModels({
    name: 'Simulated header trip',
    mission: { hours: MISSION, demand: 'low' },
    groups: [
      { id: 'PT', voting: '2oo3', beta: 0.05, betaD: 0.02, channels: { identical: { lambdaDU: 5e-7, lambdaDD: 2e-6, mttrHours: 8, proofTest: { intervalHours: YEAR } }, count: 3 } },
      { id: 'XV', voting: '1oo2', beta: 0.05, channels: { identical: { lambdaDU: 2e-6, lambdaDD: 1e-6, mttrHours: 8, proofTest: { intervalHours: YEAR } }, count: 2 } },
    ],
  });
  const tree: FaultTreeModel = faultTree;
  let start = performance.now();
  simulateFaultTreeModel(tree, { samples: 50_000, seed: 1 });
  const rate = 50_000 / (milliseconds(start) / 1000);
  const samples = Math.round(rate * 10);
  start = performance.now();
  const result = simulateFaultTreeModel(tree, { samples, seed: 2 });
  const elapsed = milliseconds(start) / 1000;
  const pfd = result.interval!.pfdAvg;
  const pfh = result.interval!.pfh;
  console.log(`Monte Carlo, ${tree.events.length} events (2oo3 + 1oo2 with CCF, DD, repair): ${format(samples / elapsed)} missions per second`);
  console.log(`  after ${elapsed.toFixed(1)} s (${samples.toLocaleString('en-US')} missions): PFDavg ${result.pfdAvg.toExponential(3)}, 99 % interval width ${(((pfd.upper - pfd.lower) / result.pfdAvg) * 100).toFixed(1)} % of the value; PFH ${result.pfh.toExponential(3)}, width ${(((pfh.upper - pfh.lower) / result.pfh) * 100).toFixed(1)} %`);
}

let calibrationChain: { source: Int32Array; target: Int32Array; rate: Float64Array; size: number } | undefined;

/** The machine's speed now: ns per stored entry of one sparse product (the issue measured about 3 ns). */
function calibrate(): number {
  if (!calibrationChain) {
    const chain = sparseChain(100_000);
    const index = new Map(chain.states.map((state, position) => [state.id, position]));
    calibrationChain = {
      source: Int32Array.from(chain.transitions, (transition) => index.get(transition.from)!),
      target: Int32Array.from(chain.transitions, (transition) => index.get(transition.to)!),
      rate: Float64Array.from(chain.transitions, (transition) => transition.rate),
      size: chain.states.length,
    };
  }
  const { source, target, rate, size } = calibrationChain;
  const input = new Float64Array(size).fill(1e-5);
  const output = new Float64Array(size);
  const repeats = 20;
  let best = Infinity;
  // Best of five rounds: the machine is shared, and the best round is the one least disturbed, as the
  // best of several timed runs is.
  for (let round = 0; round < 5; round += 1) {
    const start = performance.now();
    for (let repeat = 0; repeat < repeats; repeat += 1) {
      output.fill(0);
      for (let slot = 0; slot < rate.length; slot += 1) output[target[slot]] += input[source[slot]] * rate[slot];
    }
    best = Math.min(best, (milliseconds(start) * 1e6) / (repeats * rate.length));
  }
  return best;
}

/** A timing with the calibration measured just before it, and the time scaled to the issue's 3 ns. */
function scaled(elapsed: number, nanoseconds: number): string {
  return `${format(elapsed)} ms at ${nanoseconds.toFixed(1)} ns per sparse entry now, about ${format((elapsed * 3) / nanoseconds)} ms at the issue's 3 ns`;
}

console.log(`Markov engine and Monte Carlo benchmark (node ${process.version}, load average ${loadavg().map((value) => value.toFixed(1)).join(' ')} on ${availableParallelism()} cores)`);
console.log(`calibration: one sparse product costs ${calibrate().toFixed(1)} ns per entry now (the issue's baseline: about 3 ns)`);
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "groups") independentGroups();
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "crew") {
  dependentChain(1);
  dependentChain(0.9);
}
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "generator") largeGeneration();
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "dense") versusDense();
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "sparse") largeSparse();
if (!process.env.BENCH_ONLY || process.env.BENCH_ONLY === "montecarlo") monteCarlo();

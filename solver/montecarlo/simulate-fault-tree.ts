import { faultTreeModel, type FaultTreeModel } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { throwIfAborted } from '../common/abort.js';
import { ModelError } from '../common/model-error.js';
import { createRandomStream, type RandomStream } from '../random/index.js';
import type { SolveOptions } from '../solve-options.js';
import { compileSimulation, type CompiledSimulation } from './compile-simulation.js';
import { EventQueue } from './event-queue.js';

/** Version stamp of this engine, used when the caller does not pass one. */
export const MONTE_CARLO_ENGINE_VERSION = '1.0.0';
/** Most missions one run simulates. */
export const MAX_SAMPLES = 100_000_000;
/** Two-sided 99 % standard normal quantile, z_0.995 (standard tables). */
const Z_99 = 2.5758293035489004;

export interface MonteCarloOptions extends SolveOptions {
  /** Missions per batch between progress reports and cancellation checks; default 1,000. */
  readonly batchSize?: number;
  readonly solverVersion?: string;
}

const FAIL = 0;
const REVEAL = 1;
const RESTORE = 2;

/**
 * Estimates PFDavg and PFH of a fault tree by simulating whole missions, event by event: each failure
 * mode fails after an exponential time, DD failures are repaired at once (exponential time with mean
 * MTTR), DU failures wait for the next test that covers them (or the mission end), tests with
 * downDuringTest hold the event failed for their duration, and common-cause groups act through one
 * shared event per group. Per mission it records the fraction of the mission the top event is failed
 * (PFDavg sample) and the number of times a DU failure fails the top event per hour (PFH sample, the same
 * measure the exact fault-tree engine integrates). Intervals are the 99 % normal intervals of the mean
 * (central limit theorem, e.g. Rausand & Hoyland, System Reliability Theory, 2nd ed., ch. 6 on
 * simulation); with no failure in any mission, the upper bound -ln(0.01) / N of the zero-failure rule
 * (common practice). The random stream is xoshiro128** with the given seed, so a run is reproducible.
 * The curve is PFD averaged over each of timePoints equal bins.
 */
export function simulateFaultTreeModel(model: FaultTreeModel, options: MonteCarloOptions = {}): SolveResult {
  const samples = options.samples ?? 10_000;
  const seed = options.seed ?? 1;
  const bins = options.timePoints ?? 1000;
  const batchSize = options.batchSize ?? 1000;
  if (!Number.isInteger(samples) || samples < 1 || samples > MAX_SAMPLES) {
    throw new RangeError(`samples must be an integer from 1 to ${MAX_SAMPLES.toLocaleString('en-US')} (got ${samples})`);
  }
  if (!Number.isSafeInteger(seed)) throw new RangeError(`seed must be an integer (got ${seed})`);
  if (!Number.isInteger(bins) || bins < 2 || bins > 1_000_000) throw new RangeError(`timePoints must be an integer from 2 to 1,000,000 (got ${bins})`);
  if (!Number.isInteger(batchSize) || batchSize < 1) throw new RangeError(`batchSize must be a positive integer (got ${batchSize})`);
  const parsed = faultTreeModel.safeParse(model);
  if (!parsed.success) {
    throw new ModelError(parsed.error.issues.map((issue) => ({ path: issue.path.map((part) => (typeof part === 'number' ? part : String(part))), message: issue.message })));
  }
  const progress = options.onProgress ?? (() => undefined);
  throwIfAborted(options.signal);
  progress(0, 'compiling the fault tree for simulation');
  const compiled = compileSimulation(parsed.data);
  const simulator = new MissionSimulator(compiled, createRandomStream(seed), bins);

  let pfdSum = 0;
  let pfdSquares = 0;
  let pfhSum = 0;
  let pfhSquares = 0;
  for (let done = 0; done < samples; ) {
    throwIfAborted(options.signal);
    const batch = Math.min(batchSize, samples - done);
    for (let index = 0; index < batch; index += 1) {
      simulator.run();
      pfdSum += simulator.downFraction;
      pfdSquares += simulator.downFraction ** 2;
      pfhSum += simulator.failureRate;
      pfhSquares += simulator.failureRate ** 2;
    }
    done += batch;
    progress(done / samples, `simulated ${done.toLocaleString('en-US')} of ${samples.toLocaleString('en-US')} missions`);
  }

  const missionHours = compiled.missionHours;
  const pfdAvg = pfdSum / samples;
  const pfh = pfhSum / samples;
  const pfdInterval = interval(pfdSum, pfdSquares, samples, 1);
  const pfhInterval = interval(pfhSum, pfhSquares, samples, 1 / missionHours);
  const binHours = missionHours / bins;
  const curveHours = Array.from({ length: bins }, (_, bin) => (bin + 0.5) * binHours);
  const curvePfd = Array.from(simulator.binDown, (down) => down / (samples * binHours));
  const pfdMax = curvePfd.reduce((best, value) => Math.max(best, value), 0);
  const measure = parsed.data.mission.demand === 'low' ? pfdAvg : pfh;
  return {
    method: 'montecarlo',
    algorithm: `discrete-event simulation of ${samples.toLocaleString('en-US')} missions (xoshiro128**, seed ${seed}), ${compiled.modes.length} failure modes; 99 % normal intervals of the mean`,
    solverVersion: options.solverVersion ?? MONTE_CARLO_ENGINE_VERSION,
    demand: parsed.data.mission.demand,
    missionHours,
    pfdAvg,
    pfdMax,
    pfh,
    rrf: pfdAvg > 0 ? 1 / pfdAvg : Number.MAX_VALUE,
    sil: silReached(measure, parsed.data.mission.demand),
    curve: { hours: curveHours, pfd: curvePfd },
    simplified: [],
    cutSets: [],
    importance: [],
    interval: { pfdAvg: pfdInterval, pfh: pfhInterval },
    samples,
    warnings: [
      ...compiled.warnings,
      'the curve is PFD averaged over equal time bins, estimated from the simulated missions',
    ],
  };
}

/**
 * 99 % interval of a mean from sums; when every sample is zero, [0, -ln(0.01) / N * unit], the bound of
 * observing no failure in N trials (common practice; unit is the size of one failure in the measure).
 */
function interval(sum: number, squares: number, count: number, unit: number): { level: number; lower: number; upper: number } {
  const mean = sum / count;
  if (sum === 0) return { level: 0.99, lower: 0, upper: (-Math.log(0.01) / count) * unit };
  const variance = count > 1 ? Math.max(0, (squares - count * mean * mean) / (count - 1)) : mean * mean;
  const half = Z_99 * Math.sqrt(variance / count);
  return { level: 0.99, lower: Math.max(0, mean - half), upper: mean + half };
}

/** Simulates one mission at a time on reused typed arrays. */
class MissionSimulator {
  private readonly queue = new EventQueue();
  private readonly causes: Int32Array;
  private readonly nodeFailed: Uint8Array;
  private readonly gateCount: Int32Array;
  private readonly stack: Int32Array;
  readonly binDown: Float64Array;
  downFraction = 0;
  failureRate = 0;

  constructor(
    private readonly model: CompiledSimulation,
    private readonly random: RandomStream,
    private readonly bins: number,
  ) {
    this.causes = new Int32Array(model.eventCount);
    this.nodeFailed = new Uint8Array(model.parentStart.length - 1);
    this.gateCount = new Int32Array(model.gateThreshold.length);
    this.stack = new Int32Array(model.parentStart.length);
    this.binDown = new Float64Array(bins);
  }

  run(): void {
    const { model, queue, random } = this;
    const mission = model.missionHours;
    this.causes.fill(0);
    this.nodeFailed.fill(0);
    this.gateCount.fill(0);
    queue.clear();
    model.probabilities.forEach((probability, event) => {
      if (probability > 0 && random.next() < probability) this.addCause(event, 1);
    });
    model.modes.forEach((mode, index) => {
      const time = random.exponential(mode.rate);
      if (time < mission) queue.push(time, index * 4 + FAIL);
    });
    let downSince = this.topFailed() ? 0 : -1;
    let downTime = 0;
    let failures = 0;
    let window = 0;
    const windowCount = model.windowTimes.length;
    const noteChange = (time: number, wasDown: boolean, undetected: boolean) => {
      const isDown = this.topFailed();
      if (isDown === wasDown) return;
      if (isDown) {
        downSince = time;
        if (undetected) failures += 1;
      } else {
        downTime += time - downSince;
        this.addToBins(downSince, time);
        downSince = -1;
      }
    };

    for (;;) {
      const nextEvent = queue.peekTime();
      const nextWindow = window < windowCount ? model.windowTimes[window] : Infinity;
      if (nextEvent >= mission && nextWindow >= mission) break;
      if (nextWindow <= nextEvent) {
        const wasDown = this.topFailed();
        this.addCause(model.windowEvents[window], model.windowDeltas[window]);
        noteChange(nextWindow, wasDown, false);
        window += 1;
        continue;
      }
      const payload = queue.pop();
      const modeIndex = payload >> 2;
      const kind = payload & 3;
      const mode = model.modes[modeIndex];
      const time = nextEvent;
      if (kind === FAIL) {
        const wasDown = this.topFailed();
        for (const target of mode.targets) this.addCause(target, 1);
        noteChange(time, wasDown, mode.undetected);
        if (mode.reveal === 'at-once') {
          queue.push(time + random.exponential(1 / mode.mttrHours), modeIndex * 4 + RESTORE);
        } else if (mode.reveal === 'tests') {
          const found = nextAfter(mode.revealTimes, time);
          if (found < mission) queue.push(found, modeIndex * 4 + REVEAL);
        }
      } else if (kind === REVEAL) {
        if (mode.mttrHours > 0) {
          queue.push(time + random.exponential(1 / mode.mttrHours), modeIndex * 4 + RESTORE);
        } else {
          this.restore(modeIndex, time, noteChange);
        }
      } else {
        this.restore(modeIndex, time, noteChange);
      }
    }
    if (downSince >= 0) {
      downTime += mission - downSince;
      this.addToBins(downSince, mission);
    }
    this.downFraction = downTime / mission;
    this.failureRate = failures / mission;
  }

  private restore(modeIndex: number, time: number, noteChange: (time: number, wasDown: boolean, undetected: boolean) => void): void {
    const mode = this.model.modes[modeIndex];
    const wasDown = this.topFailed();
    for (const target of mode.targets) this.addCause(target, -1);
    noteChange(time, wasDown, false);
    const next = time + this.random.exponential(mode.rate);
    if (next < this.model.missionHours) this.queue.push(next, modeIndex * 4 + FAIL);
  }

  private topFailed(): boolean {
    return this.nodeFailed[this.model.topNode] === 1;
  }

  private addCause(event: number, delta: number): void {
    const before = this.causes[event];
    this.causes[event] = before + delta;
    if ((before === 0) !== (before + delta === 0)) this.flip(event);
  }

  /** Flips a node and propagates up the DAG through the gates' failed-input counts. */
  private flip(start: number): void {
    const { parentStart, parents, gateThreshold, eventCount } = this.model;
    const stack = this.stack;
    let depth = 0;
    this.nodeFailed[start] ^= 1;
    stack[depth++] = start;
    while (depth > 0) {
      const node = stack[--depth];
      const delta = this.nodeFailed[node] === 1 ? 1 : -1;
      for (let slot = parentStart[node]; slot < parentStart[node + 1]; slot += 1) {
        const gate = parents[slot];
        const before = this.gateCount[gate] >= gateThreshold[gate];
        this.gateCount[gate] += delta;
        const after = this.gateCount[gate] >= gateThreshold[gate];
        if (before !== after) {
          this.nodeFailed[eventCount + gate] = after ? 1 : 0;
          stack[depth++] = eventCount + gate;
        }
      }
    }
  }

  private addToBins(from: number, to: number): void {
    const width = this.model.missionHours / this.bins;
    const first = Math.min(this.bins - 1, Math.floor(from / width));
    const last = Math.min(this.bins - 1, Math.floor(to / width));
    if (first === last) {
      this.binDown[first] += to - from;
      return;
    }
    this.binDown[first] += (first + 1) * width - from;
    for (let bin = first + 1; bin < last; bin += 1) this.binDown[bin] += width;
    this.binDown[last] += to - last * width;
  }
}

/** The first time in a sorted array strictly after t, or Infinity. */
function nextAfter(times: Float64Array, t: number): number {
  let low = 0;
  let high = times.length;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (times[middle] <= t) low = middle + 1;
    else high = middle;
  }
  return low < times.length ? times[low] : Infinity;
}

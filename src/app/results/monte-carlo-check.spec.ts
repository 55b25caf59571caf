import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { MethodResult } from '../../../shared/api/results.js';
import { solve, type Solve } from '../../../shared/api/solves.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { OWNER_ID, PROJECT_ID } from '../testing/fixtures';
import { MonteCarloCheck } from './monte-carlo-check';
import { monteCarloAgreement } from './verdict';

const MODEL_ID = '4d3c2b1a-0f9e-4d8c-9b7a-6a5f4e3d2c1b';
const EXACT_ID = '5e4d3c2b-1a0f-4e9d-8c8b-7b6a5f4e3d2c';
const CHECK_ID = '6f5e4d3c-2b1a-4f0e-9d9c-8c7b6a5f4e3d';

/** Invented figures: an exact PFDavg of 1.26e-3 and PFH of 2.1e-7 per hour. */
const EXACT: MethodResult = { solveId: EXACT_ID, method: 'exact', engine: 'fault-tree', algorithm: 'BDD', pfdAvg: 1.26e-3, pfh: 2.1e-7, interval: null, samples: null };

function simulated(pfdAvg: number, lower: number, upper: number): MethodResult {
  return {
    solveId: CHECK_ID,
    method: 'montecarlo',
    engine: 'montecarlo',
    algorithm: 'discrete-event simulation',
    pfdAvg,
    pfh: 2.0e-7,
    interval: { pfdAvg: { level: 0.99, lower, upper }, pfh: { level: 0.99, lower: 1.7e-7, upper: 2.5e-7 } },
    samples: 100_000,
  };
}

function aSolve(overrides: Partial<Solve> = {}): Solve {
  return solve.parse({
    id: EXACT_ID,
    projectId: PROJECT_ID,
    modelId: MODEL_ID,
    revisionNumber: null,
    draftVersion: 3,
    contentHash: 'abc',
    solverVersion: '1.0.0',
    settings: { method: 'exact', timePoints: 500 },
    status: 'succeeded',
    progress: 1,
    stage: null,
    error: null,
    cached: false,
    cancelRequested: false,
    requestedById: OWNER_ID,
    requestedByDisplayName: 'Mira Okafor',
    createdAt: '2026-01-05T10:00:00.000Z',
    startedAt: '2026-01-05T10:00:01.000Z',
    finishedAt: '2026-01-05T10:00:02.000Z',
    result: null,
    ...overrides,
  });
}

/** jsdom has no EventSource: this one lets the spec send the solve's events by hand. */
class FakeEventSource {
  static last: FakeEventSource | null = null;
  static readonly CLOSED = 2;
  readyState = 1;
  private readonly listeners = new Map<string, ((event: MessageEvent<string>) => void)[]>();
  constructor(readonly url: string) {
    FakeEventSource.last = this;
  }
  addEventListener(type: string, listener: (event: MessageEvent<string>) => void): void {
    this.listeners.set(type, [...(this.listeners.get(type) ?? []), listener]);
  }
  send(type: string, data: unknown): void {
    for (const listener of this.listeners.get(type) ?? []) listener({ data: JSON.stringify(data) } as MessageEvent<string>);
  }
  close(): void {
    this.readyState = FakeEventSource.CLOSED;
  }
}

describe('monteCarloAgreement', () => {
  it('puts the demand measure first and says whether the exact value lies in the 99 % interval, bounds included', () => {
    const inside = monteCarloAgreement([EXACT, simulated(1.2e-3, 1.0e-3, 1.4e-3)], 'low');
    expect(inside?.measures.map((row) => row.measure)).toEqual(['pfdAvg', 'pfh']);
    expect(inside?.measures[0]).toMatchObject({ estimate: 1.2e-3, exact: 1.26e-3, exactInside: true });
    expect(inside?.measures[0].difference).toBeCloseTo((1.2e-3 - 1.26e-3) / 1.26e-3, 12);
    expect(monteCarloAgreement([EXACT, simulated(1.2e-3, 1.0e-3, 1.26e-3)], 'low')?.measures[0].exactInside).toBe(true);
    expect(monteCarloAgreement([EXACT, simulated(1.0e-3, 0.9e-3, 1.25e-3)], 'low')?.measures[0].exactInside).toBe(false);
    expect(monteCarloAgreement([EXACT, simulated(1.2e-3, 1.0e-3, 1.4e-3)], 'high')?.measures[0].measure).toBe('pfh');
  });

  it('is null without a Monte Carlo result, and has no verdict without an exact one', () => {
    expect(monteCarloAgreement([EXACT], 'low')).toBeNull();
    expect(monteCarloAgreement([simulated(1.2e-3, 1e-3, 1.4e-3)], 'low')?.measures[0].exactInside).toBeNull();
  });
});

describe('MonteCarloCheck', () => {
  let http: HttpTestingController;

  beforeEach(() => {
    FakeEventSource.last = null;
    vi.stubGlobal('EventSource', FakeEventSource);
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => {
    http.verify();
    vi.unstubAllGlobals();
  });

  async function render(inputs: { methods: MethodResult[]; solve?: Solve; modelKind?: 'fault-tree' | 'markov' }) {
    const fixture = TestBed.createComponent(MonteCarloCheck);
    fixture.componentRef.setInput('projectId', PROJECT_ID);
    fixture.componentRef.setInput('solve', inputs.solve ?? aSolve());
    fixture.componentRef.setInput('modelKind', inputs.modelKind ?? 'fault-tree');
    fixture.componentRef.setInput('demand', 'low');
    fixture.componentRef.setInput('methods', inputs.methods);
    const checked: string[] = [];
    fixture.componentInstance.checked.subscribe((id) => checked.push(id));
    await settle(fixture);
    return { fixture, element: fixture.nativeElement as HTMLElement, checked };
  }

  it('starts a Monte Carlo solve of the same draft version with the missions and seed, shows progress, cancels', async () => {
    const { fixture, element, checked } = await render({ methods: [EXACT] });
    expect(element.textContent).toContain('No Monte Carlo check of this model content yet');
    const seed = element.querySelector<HTMLInputElement>('input[name="monteCarloSeed"]')!;
    seed.value = '42';
    seed.dispatchEvent(new Event('input'));
    element.querySelector<HTMLButtonElement>('[data-run-monte-carlo]')!.click();
    await settle(fixture);
    const start = http.expectOne(`/api/projects/${PROJECT_ID}/models/${MODEL_ID}/solves`);
    expect(start.request.body).toEqual({ source: { kind: 'draft', version: 3 }, settings: { method: 'montecarlo', timePoints: 500, samples: 100_000, seed: 42 } });
    start.flush(aSolve({ id: CHECK_ID, status: 'queued', progress: 0, settings: { method: 'montecarlo', timePoints: 500, samples: 100_000, seed: 42 }, finishedAt: null, startedAt: null }));
    await settle(fixture);
    expect(FakeEventSource.last?.url).toBe(`/api/projects/${PROJECT_ID}/solves/${CHECK_ID}/events`);
    const running = aSolve({ id: CHECK_ID, status: 'running', progress: 0.25, settings: { method: 'montecarlo', timePoints: 500, samples: 100_000, seed: 42 }, finishedAt: null });
    const { result: _result, ...summary } = running;
    FakeEventSource.last!.send('status', summary);
    FakeEventSource.last!.send('progress', { progress: 0.4, stage: 'simulating missions' });
    await settle(fixture);
    expect(element.querySelector('[data-monte-carlo-status]')?.textContent).toContain('Simulating: 40 % · simulating missions');
    element.querySelector<HTMLButtonElement>('[data-cancel-monte-carlo]')!.click();
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/solves/${CHECK_ID}/cancel`).flush(aSolve({ ...running, status: 'cancelled', cancelRequested: true }));
    await settle(fixture);
    expect(element.querySelector('[data-monte-carlo-status]')?.getAttribute('data-status')).toBe('cancelled');
    expect(element.querySelector('[data-run-monte-carlo]')).not.toBeNull();
    expect(checked).toEqual([]);
  });

  it('solves a revision when the results are of a revision, and reports a stored result as checked at once', async () => {
    const { fixture, element, checked } = await render({ methods: [EXACT], solve: aSolve({ revisionNumber: 2, draftVersion: null }) });
    element.querySelector<HTMLButtonElement>('[data-run-monte-carlo]')!.click();
    await settle(fixture);
    const start = http.expectOne(`/api/projects/${PROJECT_ID}/models/${MODEL_ID}/solves`);
    expect(start.request.body.source).toEqual({ kind: 'revision', number: 2 });
    start.flush(aSolve({ id: CHECK_ID, cached: true, settings: { method: 'montecarlo', timePoints: 500, samples: 100_000, seed: 1 } }));
    await settle(fixture);
    expect(checked).toEqual([CHECK_ID]);
    expect(element.querySelector('[data-monte-carlo-status]')?.textContent).toContain('stored result');
  });

  it('shows the estimate with its interval and whether the exact value lies inside', async () => {
    const { element } = await render({ methods: [EXACT, simulated(1.0e-3, 0.9e-3, 1.2e-3)] });
    const rows = element.querySelectorAll('[data-monte-carlo-result] tbody tr');
    expect(rows[0].textContent).toContain('PFDavg');
    expect(rows[0].textContent).toContain('99 %: 9.00e-4 to 1.20e-3');
    expect(rows[0].textContent).toContain('no: the estimate differs by -20.6 %');
    expect(rows[1].textContent).toContain('PFH per hour');
    expect(rows[1].textContent).toContain('yes (the estimate differs by -4.8 %)');
  });

  it('says why a stale draft cannot be checked, keeps the settings and refuses bad ones by name', async () => {
    const { fixture, element } = await render({ methods: [EXACT] });
    element.querySelector<HTMLButtonElement>('[data-run-monte-carlo]')!.click();
    await settle(fixture);
    http
      .expectOne(`/api/projects/${PROJECT_ID}/models/${MODEL_ID}/solves`)
      .flush({ error: { code: 'version_conflict', message: 'the draft is at version 4, not 3', details: { current: null } } }, { status: 409, statusText: 'Conflict' });
    await settle(fixture);
    expect(element.querySelector('.problem')?.textContent).toContain('The draft has changed since this solve (which was of draft version 3)');
    const samples = element.querySelector<HTMLInputElement>('input[name="monteCarloSamples"]')!;
    samples.value = '50';
    samples.dispatchEvent(new Event('input'));
    await settle(fixture);
    expect(element.textContent).toContain('Missions must be a whole number from 100 to 10000000.');
    expect(element.querySelector<HTMLButtonElement>('[data-run-monte-carlo]')!.disabled).toBe(true);
  });

  it('explains that a state model has no Monte Carlo check', async () => {
    const { element } = await render({ methods: [{ ...EXACT, engine: 'markov' }], modelKind: 'markov' });
    expect(element.querySelector('[data-monte-carlo-unavailable]')?.textContent).toContain('No Monte Carlo check for a state model');
    expect(element.querySelector('[data-run-monte-carlo]')).toBeNull();
  });
});

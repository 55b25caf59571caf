import { HttpTestingController } from '@angular/common/http/testing';
import { NO_ERRORS_SCHEMA, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { resultAnalysis, type ResultAnalysis } from '../../../shared/api/results.js';
import { deriveSifTarget } from '../../../shared/api/sif-target.js';
import { solve } from '../../../shared/api/solves.js';
import type { FaultTreeModel, MarkovModel, ModelFile } from '../../../shared/model-file.js';
import { silReached } from '../../../shared/sil.js';
import { architecturalConstraints, silClaim, spuriousTripRate } from '../../../solver/analysis/index.js';
import { solveModel } from '../../../solver/index.js';
import { annotation } from '../../../shared/api/annotations.js';
import { SessionStore } from '../auth/session-store';
import { CanvasFocus } from '../canvas/canvas-focus';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { OWNER_ID, PROJECT_ID } from '../testing/fixtures';
import { FigureComments } from './figure-comments';
import { ResultsPage } from './results-page';

const SIF_ID = '3c2b1a0f-9e8d-4c7b-8a69-5f4e3d2c1b0a';
const MODEL_ID = '4d3c2b1a-0f9e-4d8c-9b7a-6a5f4e3d2c1b';
const SOLVE_ID = '5e4d3c2b-1a0f-4e9d-8c8b-7b6a5f4e3d2c';

/** Transmitter in series with two valves 1oo2 (invented figures); lambda scales the valves. */
const models = new Map<number, FaultTreeModel>();
function model(valveLambda: number): FaultTreeModel {
  const known = models.get(valveLambda);
  if (known) return known;
  const created = createModel(valveLambda);
  models.set(valveLambda, created);
  return created;
}

function createModel(valveLambda: number): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Spec function',
    mission: { hours: 87_600, demand: 'low' },
    kind: 'fault-tree',
    events: [
      { id: 'PT', label: 'Transmitter', lambdaDU: 2e-7, lambdaDD: 1e-6, lambdaS: 1e-6, mttrHours: 8, deviceType: 'B', proofTest: { intervalHours: 8760 } },
      { id: 'XV-A', label: 'Valve A', lambdaDU: valveLambda, lambdaS: 1e-6, mttrHours: 24, deviceType: 'A', proofTest: { intervalHours: 8760 } },
      { id: 'XV-B', label: 'Valve B', lambdaDU: valveLambda, lambdaS: 1e-6, mttrHours: 24, deviceType: 'A', proofTest: { intervalHours: 8760 } },
    ],
    gates: [
      { id: 'TOP', type: 'or', inputs: ['PT', 'VALVES'] },
      { id: 'VALVES', label: 'Valves 1oo2', type: 'and', inputs: ['XV-A', 'XV-B'] },
    ],
    ccf: [{ id: 'CCF-XV', members: ['XV-A', 'XV-B'], beta: 0.2, model: 'beta' }],
    top: 'TOP',
  };
}

const solved = new Map<ModelFile, ReturnType<typeof build>>();

/** Each model is solved once per run (the solve is the slow part of these specs). */
function fixtures(file: ModelFile) {
  const known = solved.get(file);
  if (known) return known;
  const built = build(file);
  solved.set(file, built);
  return built;
}

function build(file: ModelFile) {
  const result = solveModel(file, { timePoints: 200 });
  const check = deriveSifTarget({ kind: 'sil', value: 2 }, 'low');
  if (!check.ok) throw new Error(check.issue.message);
  const constraints = file.kind === 'fault-tree' ? architecturalConstraints(file) : null;
  const analysis: ResultAnalysis = resultAnalysis.parse({
    solveId: SOLVE_ID,
    modelId: MODEL_ID,
    modelName: file.name,
    sif: { id: SIF_ID, tag: 'PZT-0301', title: 'Spec shutdown', demandMode: 'low', target: { kind: 'sil', value: 2 }, derivedTarget: check.derived, status: 'draft' },
    model: file,
    constraints,
    claim: silClaim({ probabilitySil: silReached(result.pfdAvg, 'low'), demand: 'low', measureText: `PFDavg ${result.pfdAvg}`, constraints }),
    spuriousTrip: file.kind === 'fault-tree' ? spuriousTripRate(file) : null,
    methods: [{ solveId: SOLVE_ID, method: 'exact', engine: result.method, algorithm: result.algorithm, pfdAvg: result.pfdAvg, pfh: result.pfh, interval: null, samples: null }],
    notes: [],
  });
  const record = solve.parse({
    id: SOLVE_ID,
    projectId: PROJECT_ID,
    modelId: MODEL_ID,
    revisionNumber: null,
    draftVersion: 3,
    contentHash: 'abc',
    solverVersion: result.solverVersion,
    settings: { method: 'exact', timePoints: 200 },
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
    result,
  });
  return { result, analysis, record };
}

// The machine may be busy with builds: a page with a real solved result gets 30 s per test.
describe('ResultsPage', { timeout: 30_000 }, () => {
  let http: HttpTestingController;

  /** Opens the page of a draft solve, or of a solve of an issued revision (then `whenIssued` answers the review requests). */
  async function open(file: ModelFile, issued?: { revision: number; query?: string; whenIssued: () => void }) {
    TestBed.configureTestingModule({
      providers: [
        ...appTestProviders([{ path: 'projects/:projectId/sifs/:sifId/models/:modelId/results/:solveId', component: ResultsPage }]),
        { provide: SessionStore, useValue: { user: signal({ id: OWNER_ID }) } },
      ],
    });
    // jsdom draws no canvas: the charts are left out here (their options are checked in chart-options.spec.ts).
    TestBed.overrideComponent(ResultsPage, { set: { imports: [RouterLink, MatButton, MatIcon, MatProgressBar, FigureComments], schemas: [NO_ERRORS_SCHEMA] } });
    http = TestBed.inject(HttpTestingController);
    const data = fixtures(file);
    const record = issued ? { ...data.record, revisionNumber: issued.revision, draftVersion: null } : data.record;
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl(`/projects/${PROJECT_ID}/sifs/${SIF_ID}/models/${MODEL_ID}/results/${SOLVE_ID}${issued?.query ?? ''}`);
    await settle(harness.fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/solves/${SOLVE_ID}`).flush(record);
    await settle(harness.fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/solves/${SOLVE_ID}/analysis`).flush(data.analysis);
    await navigation;
    await settle(harness.fixture);
    if (issued) {
      issued.whenIssued();
      await settle(harness.fixture);
    }
    return { element: harness.routeNativeElement as HTMLElement, ...data };
  }

  afterEach(() => http.verify());

  it('shows the verdict: the measure, the SIL band and that a SIL 2 target is met with its margin', async () => {
    const { element, result } = await open(model(2e-6));
    expect(result.pfdAvg).toBeGreaterThanOrEqual(1e-3);
    expect(result.pfdAvg).toBeLessThan(1e-2);
    expect(element.querySelector('[data-measure-value]')?.textContent?.trim()).toBe(result.pfdAvg.toExponential(2));
    const text = element.querySelector('[data-verdict-text]')?.textContent ?? '';
    expect(text).toContain('Meets the target (SIL 2)');
    expect(text).toContain(`${Number((1e-2 / result.pfdAvg).toPrecision(3))} ×`);
    expect(element.querySelector('[data-methods]')?.textContent).toContain('Exact (fault tree)');
  });

  it('says a target is missed when PFDavg is at or above 1e-2', async () => {
    const { element, result } = await open(model(1e-4));
    expect(result.pfdAvg).toBeGreaterThanOrEqual(1e-2);
    expect(element.querySelector('[data-verdict-text]')?.textContent).toContain('Does not meet the target');
  });

  it('tables: contributions by subsystem first, cut sets by probability, the claim limits with their rule sets', async () => {
    const { element, result } = await open(model(2e-6));
    const contributionIds = [...element.querySelectorAll('[data-contributions] tbody tr td:first-child')].map((cell) => cell.textContent?.trim().split(' ')[0]);
    expect(contributionIds.slice(0, 2)).toEqual(['VALVES', 'PT']);
    const cutRows = element.querySelectorAll('[data-cut-sets] tbody tr');
    expect(cutRows.length).toBe(result.cutSets.length);
    expect(cutRows[0].textContent).toContain('CCF-XV');
    const limits = element.querySelector('[data-claim-limits]')?.textContent ?? '';
    expect(limits).toContain('IEC 61508-2:2010 7.4.4.2, Table 2 (type A)');
    expect(limits).toContain('IEC 61511-1:2016 11.4.5, Table 6');
    expect(element.querySelector('[data-spurious-rate]')?.textContent?.trim()).not.toBe('');
  });

  it('clicking a row highlights that item on the canvas', async () => {
    const { element } = await open(model(2e-6));
    const focus = TestBed.inject(CanvasFocus);
    const valves = [...element.querySelectorAll<HTMLElement>('[data-contributions] tbody tr')].find((row) => row.textContent?.includes('VALVES'));
    valves?.click();
    expect(focus.highlighted()).toEqual(['VALVES']);
    element.querySelector<HTMLElement>('[data-cut-sets] tbody tr:nth-child(3)')?.click();
    expect(focus.highlighted().length).toBe(2);
  });

  it('a solve of an issued revision carries a comment marker on every figure, counts them in the header and unfolds the one asked for', async () => {
    const onCutSets = annotation.parse({
      id: '6f5e4d3c-2b1a-4f0e-9d8c-8c7b6a5f4e3d',
      projectId: PROJECT_ID,
      sifId: SIF_ID,
      modelId: MODEL_ID,
      revision: 1,
      target: { kind: 'result', itemId: 'cut-sets' },
      severity: 'must-fix',
      status: 'open',
      body: 'Rank the CCF cut set first.',
      authorId: '7a6f5e4d-3c2b-4a1f-8e9d-9d8c7b6a5f4e',
      authorDisplayName: 'Rhea Reviewer',
      createdAt: '2026-01-06T09:00:00.000Z',
      resolvedById: null,
      resolvedAt: null,
      outdated: true,
      outdatedBecause: 'the figure changed since revision 1: cut sets changed',
      solveId: null,
      replies: [],
    });
    const { element } = await open(model(2e-6), {
      revision: 2,
      query: '?figure=cut-sets',
      whenIssued: () => {
        http.expectOne(`/api/projects/${PROJECT_ID}/members`).flush([{ userId: OWNER_ID, username: 'mira.okafor', displayName: 'Mira Okafor', role: 'engineer' }]);
        http.expectOne((request) => request.url === `/api/projects/${PROJECT_ID}/models/${MODEL_ID}/annotations` && request.params.get('revision') === '2').flush({ revision: 2, annotations: [onCutSets] });
      },
    });
    const markers = [...element.querySelectorAll<HTMLElement>('[data-figure-pin]')].map((pin) => `${pin.dataset['figurePin']} ${pin.querySelector('.count')?.textContent}`);
    expect(markers).toEqual(['verdict 0', 'pfd-curve 0', 'weakest-link 0', 'spurious-trips 0', 'cut-sets 1', 'importance 0', 'constraints 0', 'sensitivity 0']);
    // Each marker sits in its figure's card, under the figure's heading.
    expect(element.querySelector('[data-figure-pin="cut-sets"]')?.closest('section')?.querySelector('h2')?.textContent).toBe('Minimal cut sets');
    expect(element.querySelector('[data-figure-comments-note]')?.textContent).toContain('1 review comment on the figures, 1 open');
    const unfolded = element.querySelector('[data-figure-threads="cut-sets"]');
    expect(unfolded?.querySelector('[data-outdated-because]')?.textContent).toBe('the figure changed since revision 1: cut sets changed');
    expect(unfolded?.querySelector('form')?.getAttribute('aria-label')).toBe('New comment on Minimal cut sets');
  });

  it('a draft solve has no figure markers and says comments are kept with issued revisions', async () => {
    const { element } = await open(model(2e-6));
    expect(element.querySelector('[data-figure-pin]')).toBeNull();
    expect(element.querySelector('[data-figure-comments-note]')?.textContent).toContain('kept with issued revisions');
  });

  it('a state model: says why it has no architectural constraints and offers the sensitivity and uncertainty', async () => {
    const chain: MarkovModel = {
      format: 'proofline/model',
      version: 1,
      name: 'Spec chain',
      mission: { hours: 87_600, demand: 'low' },
      kind: 'markov',
      states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }],
      transitions: [{ from: 'OK', to: 'DU', rate: 2e-6 }],
      tests: [{ intervalHours: 8760, moves: [{ from: 'DU', to: 'OK', probability: 1 }] }],
    };
    const { element } = await open(chain);
    expect(element.querySelector('[data-constraints-unavailable]')?.textContent).toContain('A state model does not give the architectural constraints');
    expect(element.querySelector('[data-constraints]')).toBeNull();
    expect(element.querySelector('pl-sensitivity-panel')).not.toBeNull();
  });
});

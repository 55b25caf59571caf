import { HttpTestingController } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { Annotation } from '../../../shared/api/annotations.js';
import type { ReviewRound } from '../../../shared/api/reviews.js';
import { SessionStore } from '../auth/session-store';
import { CanvasFocus } from '../canvas/canvas-focus';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { ReviewPanel } from './review-panel';
import { ReviewPins } from './review-pins';

const PROJECT = '00000000-0000-4000-8000-000000000001';
const SIF = '00000000-0000-4000-8000-000000000002';
const MODEL = '00000000-0000-4000-8000-000000000003';
const REVIEWER = '00000000-0000-4000-8000-000000000004';
const ENGINEER = '00000000-0000-4000-8000-000000000005';
const AT = '2026-12-02T04:00:00.000Z';

/** An invented 1oo2 pair of switches (rates per hour). */
const FILE = {
  format: 'proofline/model',
  version: 1,
  name: 'Invented 1oo2',
  kind: 'fault-tree',
  mission: { hours: 8760, demand: 'low' },
  events: [{ id: 'LS-A', lambdaDU: 1e-6 }, { id: 'LS-B', lambdaDU: 1e-6 }],
  gates: [{ id: 'TOP', type: 'and', inputs: ['LS-A', 'LS-B'] }],
  top: 'TOP',
};

function thread(overrides: Partial<Annotation>): Annotation {
  return {
    id: '00000000-0000-4000-8000-0000000000a1',
    projectId: PROJECT,
    sifId: SIF,
    modelId: MODEL,
    revision: 1,
    target: { kind: 'gate', itemId: 'TOP' },
    severity: 'must-fix',
    status: 'open',
    body: 'No common cause group.',
    authorId: REVIEWER,
    authorDisplayName: 'Rhea',
    createdAt: AT,
    resolvedById: null,
    resolvedAt: null,
    outdated: false,
    outdatedBecause: null,
    solveId: null,
    replies: [],
    ...overrides,
  };
}

/** A succeeded solve's summary, of a revision or (null) of a draft. */
function solveSummary(id: string, revisionNumber: number | null) {
  return {
    id,
    projectId: PROJECT,
    modelId: MODEL,
    revisionNumber,
    draftVersion: revisionNumber === null ? 4 : null,
    contentHash: 'h',
    solverVersion: '1',
    settings: { method: 'exact', timePoints: 200 },
    status: 'succeeded',
    progress: 1,
    stage: null,
    error: null,
    cached: false,
    cancelRequested: false,
    requestedById: ENGINEER,
    requestedByDisplayName: 'Ezra',
    createdAt: AT,
    startedAt: AT,
    finishedAt: AT,
  };
}

const ROUND: ReviewRound = {
  id: '00000000-0000-4000-8000-0000000000b1',
  projectId: PROJECT,
  sifId: SIF,
  sifTag: 'LZ-1',
  modelId: MODEL,
  modelName: 'Invented 1oo2',
  modelKind: 'fault-tree',
  revision: 2,
  message: 'Please look.',
  status: 'open',
  requestedById: ENGINEER,
  requestedByDisplayName: 'Ezra',
  requestedAt: AT,
  reviewers: [{ userId: REVIEWER, displayName: 'Rhea' }],
  decidedById: null,
  decidedAt: null,
  decisionComment: '',
};

describe('ReviewPanel', () => {
  let http: HttpTestingController;

  async function render(me: string, annotations: Annotation[], solves?: (revision: number) => void) {
    TestBed.configureTestingModule({
      providers: [...appTestProviders(), { provide: SessionStore, useValue: { user: signal({ id: me }) } }],
    });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ReviewPanel);
    fixture.componentRef.setInput('projectId', PROJECT);
    fixture.componentRef.setInput('sifId', SIF);
    fixture.componentRef.setInput('modelId', MODEL);
    fixture.componentRef.setInput('latestRevision', 2);
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT}/members`).flush([
      { userId: REVIEWER, username: 'reviewer', displayName: 'Rhea', role: 'reviewer' },
      { userId: ENGINEER, username: 'engineer', displayName: 'Ezra', role: 'engineer' },
    ]);
    http.expectOne(`/api/projects/${PROJECT}/sifs/${SIF}/reviews`).flush([ROUND]);
    http.expectOne((request) => request.url === `/api/projects/${PROJECT}/models/${MODEL}/annotations`).flush({ revision: 2, annotations });
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT}/models/${MODEL}/revisions/2`).flush({
      id: '00000000-0000-4000-8000-0000000000c1', modelId: MODEL, number: 2, contentHash: 'h', reason: 'r', issuedAt: AT, issuedById: ENGINEER, issuedByDisplayName: 'Ezra', content: FILE,
    });
    await settle(fixture);
    if (solves) {
      solves(2);
      await settle(fixture);
    }
    (fixture.nativeElement as HTMLElement).querySelector<HTMLButtonElement>('.review-toggle')!.click();
    await settle(fixture);
    return { fixture, element: fixture.nativeElement as HTMLElement };
  }

  afterEach(() => http.verify());

  it('lists threads with severity and outdated marks, and outlines the pinned gate on the canvas when one is clicked', async () => {
    const { fixture, element } = await render(REVIEWER, [thread({ outdated: true })]);
    const item = element.querySelector('[data-annotation="TOP"]')!;
    expect(item.querySelector('.severity')?.textContent).toBe('must-fix');
    expect(item.querySelector('.outdated')?.textContent).toBe('outdated');
    (item.querySelector('.thread-head') as HTMLButtonElement).click();
    await settle(fixture);
    expect(TestBed.inject(CanvasFocus).highlighted()).toEqual(['TOP']);
    const pins = [...element.querySelectorAll('select[name="pin"] option')].map((option) => option.textContent);
    expect(pins).toEqual([
      'The whole model',
      'event LS-A',
      'event LS-B',
      'gate TOP',
      // Every figure of the results page (shared/api/annotations.ts RESULT_FIGURES).
      'result figure Verdict',
      'result figure PFD(t) chart',
      'result figure Weakest link',
      'result figure Spurious trips',
      'result figure Minimal cut sets',
      'result figure Importance measures',
      'result figure Architectural constraints and the SIL claim',
      'result figure Sensitivity and uncertainty',
    ]);
  });

  it('lists result-figure threads by their figure, says why one is outdated, and links to the figure on the latest results of the revision', async () => {
    const figure = thread({
      id: '00000000-0000-4000-8000-0000000000a2',
      target: { kind: 'result', itemId: 'cut-sets' },
      severity: 'question',
      outdated: true,
      outdatedBecause: 'the figure changed since revision 1: cut sets changed',
    });
    const { fixture, element } = await render(ENGINEER, [figure], (revision) => {
      // A draft solve of the same content comes first in the list; the link goes to the revision's own solve.
      http.expectOne((request) => request.url === `/api/projects/${PROJECT}/models/${MODEL}/solves` && request.params.get('revision') === String(revision)).flush([
        solveSummary('00000000-0000-4000-8000-0000000000d2', null),
        solveSummary('00000000-0000-4000-8000-0000000000d1', revision),
      ]);
    });
    const item = element.querySelector('[data-annotation="cut-sets"]')!;
    expect(item.querySelector('.thread-head')?.textContent).toContain('result figure Minimal cut sets');
    expect(item.querySelector('.outdated')?.getAttribute('title')).toBe('the figure changed since revision 1: cut sets changed');
    (item.querySelector('.thread-head') as HTMLButtonElement).click();
    await settle(fixture);
    expect(item.querySelector('[data-outdated-because]')?.textContent).toBe('Outdated: the figure changed since revision 1: cut sets changed.');
    const link = item.querySelector<HTMLAnchorElement>('[data-results-link]')!;
    expect(link.getAttribute('href')).toBe(`/projects/${PROJECT}/sifs/${SIF}/models/${MODEL}/results/00000000-0000-4000-8000-0000000000d1?figure=cut-sets`);
    // A figure thread pins nothing on the canvas.
    expect(TestBed.inject(ReviewPins).pins().size).toBe(0);
    expect(TestBed.inject(CanvasFocus).highlighted()).toEqual([]);
  });

  it('publishes its threads as canvas pins, opens the thread of a clicked pin, and takes the pins away when closed', async () => {
    const { fixture, element } = await render(ENGINEER, [thread({})]);
    const pins = TestBed.inject(ReviewPins);
    expect(pins.pins().get('gate:TOP')).toMatchObject({ count: 1, severity: 'must-fix' });
    (element.querySelector('.review-toggle') as HTMLButtonElement).click();
    await settle(fixture);
    expect(element.querySelector('[data-annotation]')).toBeNull();
    pins.open('gate:TOP');
    await settle(fixture);
    const opened = element.querySelector('[data-annotation="TOP"]')!;
    expect(opened.classList).toContain('open');
    expect(opened.querySelector('button[type="button"]')).not.toBeNull();
    expect([...opened.querySelectorAll('button')].map((button) => button.textContent?.trim())).toContain('Resolve');
    expect(TestBed.inject(CanvasFocus).highlighted()).toEqual(['TOP']);
    fixture.destroy();
    expect(pins.pins().size).toBe(0);
  });

  it('filters the threads by status and severity through the API and shows what it answers', async () => {
    const { fixture, element } = await render(REVIEWER, [thread({})]);
    const status = element.querySelector<HTMLSelectElement>('select[name="status-filter"]')!;
    status.value = 'resolved';
    status.dispatchEvent(new Event('change'));
    await settle(fixture);
    const reload = () => {
      http.expectOne(`/api/projects/${PROJECT}/members`).flush([{ userId: REVIEWER, username: 'reviewer', displayName: 'Rhea', role: 'reviewer' }]);
      http.expectOne(`/api/projects/${PROJECT}/sifs/${SIF}/reviews`).flush([ROUND]);
      return http.expectOne((request) => request.url === `/api/projects/${PROJECT}/models/${MODEL}/annotations`);
    };
    const byStatus = reload();
    expect([byStatus.request.params.get('status'), byStatus.request.params.get('severity')]).toEqual(['resolved', null]);
    byStatus.flush({ revision: 2, annotations: [] });
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT}/models/${MODEL}/revisions/2`).flush({
      id: '00000000-0000-4000-8000-0000000000c1', modelId: MODEL, number: 2, contentHash: 'h', reason: 'r', issuedAt: AT, issuedById: ENGINEER, issuedByDisplayName: 'Ezra', content: FILE,
    });
    await settle(fixture);
    expect(element.querySelector('.threads')?.textContent?.trim()).toBe('No annotations.');

    const severity = element.querySelector<HTMLSelectElement>('select[name="severity-filter"]')!;
    severity.value = 'must-fix';
    severity.dispatchEvent(new Event('change'));
    await settle(fixture);
    const both = reload();
    expect([both.request.params.get('status'), both.request.params.get('severity')]).toEqual(['resolved', 'must-fix']);
    both.flush({ revision: 2, annotations: [thread({ status: 'resolved' })] });
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT}/models/${MODEL}/revisions/2`).flush({
      id: '00000000-0000-4000-8000-0000000000c1', modelId: MODEL, number: 2, contentHash: 'h', reason: 'r', issuedAt: AT, issuedById: ENGINEER, issuedByDisplayName: 'Ezra', content: FILE,
    });
    await settle(fixture);
    expect(element.querySelector('[data-annotation="TOP"]')?.getAttribute('data-status')).toBe('resolved');
  });

  it('compares two revisions: each changed field old -> new, the results side by side, and the changed items outlined on the canvas', async () => {
    const { fixture, element } = await render(ENGINEER, []);
    const diff = element.querySelector<HTMLElement>('[aria-label="Revision diff"]')!;
    expect(diff.querySelector<HTMLSelectElement>('select[name="diff-from"]')!.value).toBe('1');
    expect(diff.querySelector<HTMLSelectElement>('select[name="diff-to"]')!.value).toBe('2');
    [...diff.querySelectorAll('button')].find((button) => button.textContent?.trim() === 'Compare')!.click();
    await settle(fixture);
    const request = http.expectOne((candidate) => candidate.url === `/api/projects/${PROJECT}/models/${MODEL}/diff`);
    expect([request.request.params.get('from'), request.request.params.get('to')]).toEqual(['1', '2']);
    request.flush({
      from: 1,
      to: 2,
      items: [
        { kind: 'event', id: 'LS-B', change: 'changed', fields: [{ field: 'lambdaDU', old: 1e-6, new: 5e-7 }] },
        { kind: 'ccf', id: 'CCF-LS', change: 'added', fields: [{ field: 'beta', new: 0.05 }, { field: 'members', new: ['LS-A', 'LS-B'] }] },
      ],
      results: [{ figure: 'pfdAvg', old: 0.0044, new: 0.0025 }],
    });
    await settle(fixture);
    const [items, results] = [...diff.querySelectorAll('table.diff')];
    const rows = [...items!.querySelectorAll('tbody tr')].map((row) => [...row.querySelectorAll('td')].map((cell) => cell.textContent?.trim()));
    expect(rows).toEqual([
      ['event LS-B', 'changed', 'lambdaDU', '0.000001', '5e-7'],
      ['ccf CCF-LS', 'added', 'beta', '—', '0.05'],
      ['', '', 'members', '—', '["LS-A","LS-B"]'],
    ]);
    expect([...results!.querySelectorAll('tbody td')].map((cell) => cell.textContent?.trim())).toEqual(['pfdAvg', '0.0044', '0.0025']);
    expect(TestBed.inject(CanvasFocus).highlighted()).toEqual(['LS-B', 'CCF-LS']);
  });

  it('offers approve and return to a chosen reviewer, not to the author who asked', async () => {
    const reviewer = await render(REVIEWER, []);
    const buttons = [...reviewer.element.querySelectorAll('button')].map((button) => button.textContent?.trim());
    expect(buttons).toContain('Approve');
    expect(buttons).toContain('Return with comments');
    TestBed.resetTestingModule();
    const author = await render(ENGINEER, []);
    expect([...author.element.querySelectorAll('button')].map((button) => button.textContent?.trim())).not.toContain('Approve');
  });
});

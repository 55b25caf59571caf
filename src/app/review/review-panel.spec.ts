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
    replies: [],
    ...overrides,
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

  async function render(me: string, annotations: Annotation[]) {
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
    expect(pins).toEqual(['The whole model', 'event LS-A', 'event LS-B', 'gate TOP', 'result PFDavg', 'result PFD(t) chart']);
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

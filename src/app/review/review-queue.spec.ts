import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatSlideToggleHarness } from '@angular/material/slide-toggle/testing';
import { reviewRound } from '../../../shared/api/reviews.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { ReviewQueue } from './review-queue';

const PROJECT = '00000000-0000-4000-8000-000000000001';
const SIF = '00000000-0000-4000-8000-000000000002';
const MODEL = '00000000-0000-4000-8000-000000000003';
const ENGINEER = '00000000-0000-4000-8000-000000000005';

/** An invented open round waiting for the signed-in reviewer. */
const ROUND = reviewRound.parse({
  id: '00000000-0000-4000-8000-0000000000b1',
  projectId: PROJECT,
  sifId: SIF,
  sifTag: 'LZ-1',
  modelId: MODEL,
  modelName: 'Invented 1oo2',
  modelKind: 'fault-tree',
  revision: 2,
  message: 'Please look at the voting.',
  status: 'open',
  requestedById: ENGINEER,
  requestedByDisplayName: 'Ezra',
  requestedAt: '2026-12-02T04:00:00.000Z',
  reviewers: [{ userId: '00000000-0000-4000-8000-000000000004', displayName: 'Rhea' }],
  decidedById: null,
  decidedAt: null,
  decisionComment: '',
});

describe('ReviewQueue', () => {
  let http: HttpTestingController;

  afterEach(() => http.verify());

  it('lists the rounds waiting for me with a link to the model, and switches my e-mail notices off and on', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ReviewQueue);
    await settle(fixture);
    http.expectOne('/api/reviews/queue').flush([ROUND]);
    http.expectOne('/api/me/notices').flush({ notices: true });
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    const item = element.querySelector('[data-queue-round]')!;
    expect(item.querySelector('a')?.getAttribute('href')).toBe(`/projects/${PROJECT}/sifs/${SIF}/models/${MODEL}`);
    expect(item.textContent).toContain('LZ-1 · Invented 1oo2 · revision 2');
    expect(item.textContent).toContain('asked by Ezra on 2026-12-02 04:00 UTC');
    expect(item.textContent).toContain('Please look at the voting.');

    const toggle = await TestbedHarnessEnvironment.loader(fixture).getHarness(MatSlideToggleHarness);
    expect(await toggle.isChecked()).toBe(true);
    await toggle.toggle();
    await settle(fixture);
    const off = http.expectOne((request) => request.url === '/api/me/notices' && request.method === 'PUT');
    expect(off.request.body).toEqual({ notices: false });
    off.flush({ notices: false });
    await settle(fixture);
    expect(await toggle.isChecked()).toBe(false);
    await toggle.toggle();
    await settle(fixture);
    const on = http.expectOne((request) => request.url === '/api/me/notices' && request.method === 'PUT');
    expect(on.request.body).toEqual({ notices: true });
    on.flush({ notices: true });
    await settle(fixture);
    expect(await toggle.isChecked()).toBe(true);
  });

  it('says when nothing waits', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ReviewQueue);
    await settle(fixture);
    http.expectOne('/api/reviews/queue').flush([]);
    http.expectOne('/api/me/notices').flush({ notices: false });
    await settle(fixture);
    expect((fixture.nativeElement as HTMLElement).querySelector('.rounds')?.textContent?.trim()).toBe('Nothing to review.');
  });
});

import { HttpTestingController, type TestRequest } from '@angular/common/http/testing';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { annotation, type Annotation } from '../../../shared/api/annotations.js';
import { SessionStore } from '../auth/session-store';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { FigureComments } from './figure-comments';
import { FigureThreads } from './figure-threads';

const PROJECT = '00000000-0000-4000-8000-000000000001';
const SIF = '00000000-0000-4000-8000-000000000002';
const MODEL = '00000000-0000-4000-8000-000000000003';
const REVIEWER = '00000000-0000-4000-8000-000000000004';
const ENGINEER = '00000000-0000-4000-8000-000000000005';
const VIEWER = '00000000-0000-4000-8000-000000000006';
const SOLVE = '00000000-0000-4000-8000-0000000000d1';
const AT = '2026-12-02T04:00:00.000Z';
const LIST_URL = `/api/projects/${PROJECT}/models/${MODEL}/annotations`;

let serial = 0;
/** An invented thread on a result figure, passed through the shared schema. */
function thread(overrides: Partial<Annotation>): Annotation {
  serial += 1;
  return annotation.parse({
    id: `00000000-0000-4000-8000-${String(serial).padStart(12, '0')}`,
    projectId: PROJECT,
    sifId: SIF,
    modelId: MODEL,
    revision: 2,
    target: { kind: 'result', itemId: 'pfd-curve' },
    severity: 'remark',
    status: 'open',
    body: 'Why does the curve not return to zero after each test?',
    authorId: REVIEWER,
    authorDisplayName: 'Rhea',
    createdAt: AT,
    resolvedById: null,
    resolvedAt: null,
    outdated: false,
    outdatedBecause: null,
    solveId: SOLVE,
    replies: [],
    ...overrides,
  });
}

@Component({
  selector: 'pl-figure-host',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [FigureComments],
  providers: [FigureThreads],
  template: `
    <section class="card" data-card="pfd-curve"><h2>PFD(t)</h2><pl-figure-comments figure="pfd-curve" /></section>
    <section class="card" data-card="cut-sets"><h2>Cut sets</h2><pl-figure-comments figure="cut-sets" /></section>
  `,
})
class FigureHost {
  readonly threads = inject(FigureThreads);
}

describe('FigureComments', () => {
  let http: HttpTestingController;

  /** Renders two figures of a results page for `me`, with `threads` on revision 2 (or a draft when revision is null). */
  async function render(me: string, threads: Annotation[], revision: number | null = 2) {
    TestBed.configureTestingModule({ providers: [...appTestProviders(), { provide: SessionStore, useValue: { user: signal({ id: me }) } }] });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(FigureHost);
    const loading = fixture.componentInstance.threads.load(PROJECT, MODEL, revision, SOLVE);
    await settle(fixture);
    if (revision !== null) {
      http.expectOne(`/api/projects/${PROJECT}/members`).flush([
        { userId: REVIEWER, username: 'reviewer', displayName: 'Rhea', role: 'reviewer' },
        { userId: ENGINEER, username: 'engineer', displayName: 'Ezra', role: 'engineer' },
        { userId: VIEWER, username: 'viewer', displayName: 'Vik', role: 'viewer' },
      ]);
      const list = http.expectOne((request) => request.url === LIST_URL);
      expect(list.request.params.get('revision')).toBe(String(revision));
      list.flush({ revision, annotations: threads });
    }
    await loading;
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    const pin = (figure: string) => element.querySelector<HTMLButtonElement>(`[data-figure-pin="${figure}"]`);
    const region = (figure: string) => element.querySelector<HTMLElement>(`[data-figure-threads="${figure}"]`);
    return { fixture, element, pin, region };
  }

  /** Answers the list the page reads again after every write. */
  function relist(threads: Annotation[]): void {
    const list = http.expectOne((request) => request.url === LIST_URL && request.method === 'GET');
    expect(list.request.params.get('revision')).toBe('2');
    list.flush({ revision: 2, annotations: threads });
  }

  afterEach(() => http.verify());

  it('marks each figure with its thread count, the highest open severity and an outdated stripe, and unfolds one figure at a time', async () => {
    const must = thread({ severity: 'must-fix', outdated: true, outdatedBecause: 'the figure changed since revision 1: PFDavg 1.02e-6 -> 2.55e-6', revision: 1 });
    const answered = thread({ severity: 'question', replies: [{ id: '00000000-0000-4000-8000-0000000000e1', authorId: ENGINEER, authorDisplayName: 'Ezra', body: 'Perfect proof test assumed.', createdAt: AT }] });
    const gate = thread({ target: { kind: 'gate', itemId: 'TOP' } });
    const { fixture, pin, region } = await render(REVIEWER, [must, answered, gate]);

    expect(pin('pfd-curve')?.querySelector('.count')?.textContent).toBe('2');
    expect(pin('pfd-curve')?.dataset['severity']).toBe('must-fix');
    expect(pin('pfd-curve')?.classList).toContain('outdated');
    expect(pin('pfd-curve')?.getAttribute('aria-label')).toBe('PFD(t) chart: 2 annotations (2 open, highest must-fix, outdated: the figure changed since); show them');
    // The gate's thread belongs to the canvas, not to a figure.
    expect(pin('cut-sets')?.querySelector('.count')?.textContent).toBe('0');
    expect(pin('cut-sets')?.dataset['severity']).toBe('none');
    expect(pin('cut-sets')?.getAttribute('aria-label')).toBe('Minimal cut sets: no comments; add one');
    expect(region('pfd-curve')).toBeNull();

    pin('pfd-curve')!.click();
    await settle(fixture);
    expect(pin('pfd-curve')?.getAttribute('aria-expanded')).toBe('true');
    const shown = region('pfd-curve')!;
    expect(shown.querySelector('h3')?.textContent).toContain('Review comments on PFD(t) chart');
    const items = [...shown.querySelectorAll('[data-figure-thread]')];
    expect(items.map((item) => item.querySelector('.severity')?.textContent)).toEqual(['must-fix', 'question']);
    expect(items[0]!.querySelector('.outdated')?.textContent).toBe('outdated');
    expect(items[0]!.querySelector('[data-outdated-because]')?.textContent).toBe('the figure changed since revision 1: PFDavg 1.02e-6 -> 2.55e-6');
    expect(items[0]!.querySelector('.body')?.textContent).toContain('Rhea, revision 1');
    expect(items[1]!.querySelector('.reply')?.textContent).toContain('Perfect proof test assumed.');

    pin('cut-sets')!.click();
    await settle(fixture);
    expect(region('pfd-curve')).toBeNull();
    expect(region('cut-sets')?.textContent).toContain('No comments on this figure.');
    pin('cut-sets')!.click();
    await settle(fixture);
    expect(region('cut-sets')).toBeNull();
  });

  it('a reviewer adds a comment on the figure of the solve shown, with its severity; the marker takes it at once', async () => {
    const { fixture, pin, region } = await render(REVIEWER, []);
    pin('cut-sets')!.click();
    await settle(fixture);
    const form = region('cut-sets')!.querySelector<HTMLFormElement>('form')!;
    expect(form.getAttribute('aria-label')).toBe('New comment on Minimal cut sets');
    form.querySelector<HTMLSelectElement>('select[name="severity"]')!.value = 'must-fix';
    form.querySelector<HTMLTextAreaElement>('textarea[name="body"]')!.value = 'The CCF cut set of the valves is missing.';
    form.querySelector<HTMLButtonElement>('button[type="submit"]')!.click();
    await settle(fixture);
    const post: TestRequest = http.expectOne((request) => request.url === LIST_URL && request.method === 'POST');
    expect(post.request.body).toEqual({
      revision: 2,
      target: { kind: 'result', itemId: 'cut-sets' },
      severity: 'must-fix',
      body: 'The CCF cut set of the valves is missing.',
      solveId: SOLVE,
    });
    const created = thread({ target: { kind: 'result', itemId: 'cut-sets' }, severity: 'must-fix', body: 'The CCF cut set of the valves is missing.' });
    post.flush(created);
    await settle(fixture);
    relist([created]);
    await settle(fixture);
    expect(pin('cut-sets')?.querySelector('.count')?.textContent).toBe('1');
    expect(pin('cut-sets')?.dataset['severity']).toBe('must-fix');
    expect(region('cut-sets')?.querySelector('[data-figure-thread] .body')?.textContent).toContain('The CCF cut set of the valves is missing.');
    expect(region('cut-sets')!.querySelector<HTMLTextAreaElement>('textarea[name="body"]')!.value).toBe('');
  });

  it('the author replies, resolves and re-opens; a refused reply keeps its text', async () => {
    const open = thread({ severity: 'question' });
    const { fixture, pin, region } = await render(ENGINEER, [open]);
    pin('pfd-curve')!.click();
    await settle(fixture);
    const item = () => region('pfd-curve')!.querySelector<HTMLElement>('[data-figure-thread]')!;
    const button = (text: string) => [...item().querySelectorAll<HTMLButtonElement>('button')].find((candidate) => candidate.textContent?.trim() === text)!;

    const text = item().querySelector<HTMLTextAreaElement>('textarea[name="reply"]')!;
    text.value = 'The test restores it to as good as new.';
    button('Reply').click();
    await settle(fixture);
    http
      .expectOne(`/api/projects/${PROJECT}/annotations/${open.id}/replies`)
      .flush({ error: { code: 'conflict', message: 'the project is archived', details: {} } }, { status: 409, statusText: 'Conflict' });
    await settle(fixture);
    expect(text.value).toBe('The test restores it to as good as new.');

    button('Reply').click();
    await settle(fixture);
    const reply = http.expectOne(`/api/projects/${PROJECT}/annotations/${open.id}/replies`);
    expect(reply.request.body).toEqual({ body: 'The test restores it to as good as new.' });
    const withReply = { ...open, replies: [{ id: '00000000-0000-4000-8000-0000000000e2', authorId: ENGINEER, authorDisplayName: 'Ezra', body: 'The test restores it to as good as new.', createdAt: AT }] };
    reply.flush(withReply);
    await settle(fixture);
    relist([withReply]);
    await settle(fixture);
    expect(item().querySelector('.reply')?.textContent).toContain('The test restores it to as good as new.');
    expect(item().querySelector<HTMLTextAreaElement>('textarea[name="reply"]')!.value).toBe('');

    button('Resolve').click();
    await settle(fixture);
    const resolved = { ...withReply, status: 'resolved' as const, resolvedById: ENGINEER, resolvedAt: AT };
    http.expectOne((request) => request.url === `/api/projects/${PROJECT}/annotations/${open.id}/resolve` && request.method === 'POST').flush(resolved);
    await settle(fixture);
    relist([resolved]);
    await settle(fixture);
    expect(item().dataset['status']).toBe('resolved');
    expect(pin('pfd-curve')?.dataset['severity']).toBe('resolved');

    button('Re-open').click();
    await settle(fixture);
    http.expectOne((request) => request.url === `/api/projects/${PROJECT}/annotations/${open.id}/reopen` && request.method === 'POST').flush(withReply);
    await settle(fixture);
    relist([withReply]);
    await settle(fixture);
    expect(item().dataset['status']).toBe('open');
    expect(pin('pfd-curve')?.dataset['severity']).toBe('question');
  });

  it('a viewer reads the threads and replies but gets no form, reply or resolve', async () => {
    const { fixture, pin, region } = await render(VIEWER, [thread({ severity: 'must-fix' })]);
    expect(pin('cut-sets')?.getAttribute('aria-label')).toBe('Minimal cut sets: no comments');
    pin('pfd-curve')!.click();
    await settle(fixture);
    const shown = region('pfd-curve')!;
    expect(shown.querySelectorAll('[data-figure-thread]').length).toBe(1);
    expect(shown.querySelector('form')).toBeNull();
    expect(shown.querySelector('textarea')).toBeNull();
    expect([...shown.querySelectorAll('button')].map((button) => button.textContent?.trim())).toEqual([]);
    expect(shown.querySelector('[data-read-only]')?.textContent).toContain('you can read them');
  });

  it('a draft solve shows no markers and asks nothing of the server', async () => {
    const { element } = await render(REVIEWER, [], null);
    expect(element.querySelector('[data-figure-pin]')).toBeNull();
  });
});

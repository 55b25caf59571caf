import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { RouterTestingHarness } from '@angular/router/testing';
import { auditEntry } from '../../../shared/api/audit.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { AuditPage } from './audit-page';

const PROJECT = '00000000-0000-4000-8000-000000000001';
const SIF = '00000000-0000-4000-8000-000000000002';

/** An invented entry of the trail. */
const ENTRY = auditEntry.parse({
  id: '00000000-0000-4000-8000-0000000000f1',
  projectId: PROJECT,
  sifId: SIF,
  actorId: '00000000-0000-4000-8000-000000000004',
  actorDisplayName: 'Rhea',
  action: 'annotation.created',
  summary: 'annotated result figure PFD(t) chart of Invented 1oo2 revision 1 (question)',
  details: {},
  at: '2026-12-02T04:05:06.789Z',
});

describe('AuditPage', () => {
  let http: HttpTestingController;

  afterEach(() => http.verify());

  async function open(url: string) {
    TestBed.configureTestingModule({ providers: appTestProviders([{ path: 'projects/:projectId/audit', component: AuditPage }]) });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl(url);
    await settle(harness.fixture);
    return { harness, navigation };
  }

  it('shows the trail of one SIF with who, when and what, and offers its CSV', async () => {
    const { harness, navigation } = await open(`/projects/${PROJECT}/audit?sifId=${SIF}`);
    const request = http.expectOne((candidate) => candidate.url === `/api/projects/${PROJECT}/audit`);
    expect(request.request.params.get('sifId')).toBe(SIF);
    request.flush([ENTRY]);
    await navigation;
    await settle(harness.fixture);
    const element = harness.routeNativeElement as HTMLElement;
    expect(element.querySelector('h1')?.textContent).toBe('Audit trail of the SIF');
    const cells = [...element.querySelectorAll('tr[data-action="annotation.created"] td')].map((cell) => cell.textContent);
    expect(cells).toEqual(['2026-12-02 04:05:06', 'Rhea', 'annotation.created', 'annotated result figure PFD(t) chart of Invented 1oo2 revision 1 (question)']);
    expect(element.querySelector('a[download]')?.getAttribute('href')).toBe(`/api/projects/${PROJECT}/audit/csv?sifId=${SIF}`);
  });

  it('shows the whole project without a SIF, and says when nothing is recorded', async () => {
    const { harness, navigation } = await open(`/projects/${PROJECT}/audit`);
    const request = http.expectOne((candidate) => candidate.url === `/api/projects/${PROJECT}/audit`);
    expect(request.request.params.has('sifId')).toBe(false);
    request.flush([]);
    await navigation;
    await settle(harness.fixture);
    const element = harness.routeNativeElement as HTMLElement;
    expect(element.querySelector('h1')?.textContent).toBe('Audit trail of the project');
    expect(element.querySelector('tbody')?.textContent?.trim()).toBe('Nothing recorded yet.');
    expect(element.querySelector('a[download]')?.getAttribute('href')).toBe(`/api/projects/${PROJECT}/audit/csv`);
  });
});

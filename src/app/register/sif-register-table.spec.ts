import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController, type TestRequest } from '@angular/common/http/testing';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import type { Project } from '../../../shared/api/projects.js';
import type { SifPage } from '../../../shared/api/sifs.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { PROJECT_ID, aPage, aProject, aSif } from '../testing/fixtures';
import { SEARCH_DEBOUNCE_MS, SifRegisterTable } from './sif-register-table';

const LIST_URL = `/api/projects/${PROJECT_ID}/sifs`;

describe('SifRegisterTable', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<SifRegisterTable>;

  function nextListRequest(): TestRequest {
    return http.expectOne((request) => request.method === 'GET' && request.url === LIST_URL);
  }

  /** Answers the request and returns it, so its query can be checked. */
  function answered(request: TestRequest, body: SifPage): TestRequest {
    request.flush(body);
    return request;
  }

  function paramsOf(request: TestRequest): Record<string, string> {
    const params = request.request.params;
    return Object.fromEntries(params.keys().map((key) => [key, params.get(key) ?? '']));
  }

  async function render(project: Project = aProject()) {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SifRegisterTable);
    fixture.componentRef.setInput('project', project);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    return { loader, first: nextListRequest() };
  }

  afterEach(() => http.verify());

  it('asks the server for the first page sorted by tag and renders its rows', async () => {
    const { loader, first } = await render();
    expect(paramsOf(first)).toEqual({ includeArchived: 'false', sort: 'tag', order: 'asc', page: '1', pageSize: '25' });
    first.flush(
      aPage([
        aSif({ tag: 'HS-301', title: 'Reactor trip', target: { kind: 'rrf', value: 500 }, status: 'approved' }),
        aSif({ tag: 'HS-302', title: 'Quench valve', demandMode: 'high', target: { kind: 'pfh', value: 5e-8 }, status: 'in-review' }),
      ]),
    );
    await settle(fixture);
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['tag']?.text).toEqual(['HS-301', 'HS-302']);
    expect(rows['title']?.text).toEqual(['Reactor trip', 'Quench valve']);
    expect(rows['demandMode']?.text).toEqual(['Low demand', 'High demand']);
    // IEC 61508-1:2010 Tables 2 and 3: RRF 500 is PFDavg 2e-3 (SIL 2); PFH 5e-8 per hour is SIL 3.
    expect(rows['sil']?.text).toEqual(['RRF 500 (SIL 2)', 'PFH 5.00e-8/h (SIL 3)']);
    expect(rows['status']?.text).toEqual(['Approved', 'In review']);
    expect(fixture.nativeElement.textContent).toContain('2 functions');
  });

  it('sorts on the server when a column header is clicked, ascending then descending', async () => {
    const { loader, first } = await render();
    first.flush(aPage([aSif()]));
    await settle(fixture);
    const sort = await loader.getHarness(MatSortHarness);
    const [title] = await sort.getSortHeaders({ label: 'Title' });
    await title?.click();
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([aSif()])))).toMatchObject({ sort: 'title', order: 'asc', page: '1' });
    await title?.click();
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([aSif()])))).toMatchObject({ sort: 'title', order: 'desc' });
    const [target] = await sort.getSortHeaders({ label: 'Target' });
    await target?.click();
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([aSif()])))).toMatchObject({ sort: 'sil', order: 'asc' });
  });

  it('filters by text after the typing pauses, by status and by archived, each from the first page', async () => {
    const { loader, first } = await render();
    first.flush(aPage([aSif()], 60));
    await settle(fixture);
    await (await loader.getHarness(MatPaginatorHarness)).goToNextPage();
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([aSif()], 60, 2)))).toMatchObject({ page: '2' });

    await (await loader.getHarness(MatInputHarness.with({ selector: '[type=search]' }))).setValue('quench');
    http.expectNone(LIST_URL);
    await new Promise((resolve) => setTimeout(resolve, SEARCH_DEBOUNCE_MS + 50));
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([], 0)))).toMatchObject({ search: 'quench', page: '1' });
    await settle(fixture);
    expect(fixture.nativeElement.textContent).toContain('No SIF matches these filters.');

    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: 'Approved' });
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([], 0)))).toMatchObject({ search: 'quench', status: 'approved' });

    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'Show archived' }))).check();
    await settle(fixture);
    expect(paramsOf(answered(nextListRequest(), aPage([], 0)))).toMatchObject({ includeArchived: 'true' });
  });

  describe('what each role sees (from myRole)', () => {
    const newSifLink = () => fixture.nativeElement.querySelector('a[href$="/sifs/new"]') as HTMLElement | null;

    it('offers "New SIF" to an engineer', async () => {
      const { first } = await render(aProject({ myRole: 'engineer' }));
      first.flush(aPage([]));
      await settle(fixture);
      expect(newSifLink()?.textContent).toContain('New SIF');
    });

    it('hides "New SIF" from a viewer and a reviewer', async () => {
      for (const myRole of ['viewer', 'reviewer'] as const) {
        TestBed.resetTestingModule();
        const { first } = await render(aProject({ myRole }));
        first.flush(aPage([]));
        await settle(fixture);
        expect(newSifLink()).toBeNull();
      }
    });

    it('hides "New SIF" in an archived project, even from its lead', async () => {
      const { first } = await render(aProject({ myRole: 'lead', archived: true }));
      first.flush(aPage([]));
      await settle(fixture);
      expect(newSifLink()).toBeNull();
    });
  });
});

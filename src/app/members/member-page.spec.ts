import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { RouterTestingHarness } from '@angular/router/testing';
import type { Member, ProjectRole } from '../../../shared/api/projects.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { OWNER_ID, PROJECT_ID, aProject, aUser } from '../testing/fixtures';
import { MemberPage } from './member-page';

const NEW_USER_ID = '9a8b7c6d-5e4f-4a3b-8c2d-1e0f9a8b7c03';
const MEMBERS: Member[] = [{ userId: OWNER_ID, username: 'mira.okafor', displayName: 'Mira Okafor', role: 'lead' }];

describe('MemberPage', () => {
  let http: HttpTestingController;

  async function open(myRole: ProjectRole) {
    TestBed.configureTestingModule({
      providers: appTestProviders([{ path: 'projects/:projectId/members', component: MemberPage }]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl(`/projects/${PROJECT_ID}/members`);
    await settle(harness.fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}`).flush(aProject({ myRole }));
    http.expectOne(`/api/projects/${PROJECT_ID}/members`).flush(MEMBERS);
    await settle(harness.fixture);
    if (myRole === 'lead') {
      http.expectOne('/api/users').flush([aUser(), aUser({ id: NEW_USER_ID, username: 'tomas.reyes', displayName: 'Tomas Reyes' })]);
    }
    await navigation;
    await settle(harness.fixture);
    return { harness, loader: TestbedHarnessEnvironment.loader(harness.fixture) };
  }

  afterEach(() => http.verify());

  it('gives a lead the add form, role selects and remove buttons, and adds by username', async () => {
    const { harness, loader } = await open('lead');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Add member/ }))).toHaveLength(1);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Remove Mira Okafor"]' }))).toHaveLength(1);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=username]' }))).setValue('tomas.reyes');
    await (await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=role]' }))).clickOptions({ text: 'Reviewer' });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add member/ }))).click();
    const put = http.expectOne(`/api/projects/${PROJECT_ID}/members/${NEW_USER_ID}`);
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ role: 'reviewer' });
    put.flush({ userId: NEW_USER_ID, username: 'tomas.reyes', displayName: 'Tomas Reyes', role: 'reviewer' });
    await settle(harness.fixture);
    expect(harness.fixture.nativeElement.textContent).toContain('tomas.reyes');
  });

  it('names an unknown username instead of sending it', async () => {
    const { loader } = await open('lead');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=username]' }))).setValue('nobody.here');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add member/ }))).click();
    http.expectNone(() => true);
    const errors = await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=username]' }))).host();
    expect(await (await errors.getProperty<HTMLElement>('ariaInvalid'))).toBe('true');
  });

  it('shows an engineer the members and roles only', async () => {
    const { harness, loader } = await open('engineer');
    expect(harness.fixture.nativeElement.textContent).toContain('Mira Okafor');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Add member/ }))).toHaveLength(0);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label^="Remove"]' }))).toHaveLength(0);
    expect(await loader.getAllHarnesses(MatSelectHarness)).toHaveLength(0);
  });
});

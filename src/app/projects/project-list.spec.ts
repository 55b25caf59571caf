import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { aProject } from '../testing/fixtures';
import { ProjectList } from './project-list';

@Component({ template: 'project page' })
class ProjectStandIn {}

describe('ProjectList', () => {
  let http: HttpTestingController;

  afterEach(() => http.verify());

  it('lists the projects and creates one, then opens it', async () => {
    TestBed.configureTestingModule({
      providers: appTestProviders([
        { path: 'projects', component: ProjectList },
        { path: 'projects/:projectId', component: ProjectStandIn },
      ]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create('/projects');
    await settle(harness.fixture);
    const list = http.expectOne((request) => request.url === '/api/projects');
    expect(list.request.params.get('includeArchived')).toBe('false');
    list.flush([aProject()]);
    await settle(harness.fixture);
    expect(harness.fixture.nativeElement.textContent).toContain('Harrowgate Ammonia Unit 3');

    const loader = TestbedHarnessEnvironment.loader(harness.fixture);
    const documentLoader = TestbedHarnessEnvironment.documentRootLoader(harness.fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Create project/ }))).click();
    const name = await documentLoader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }));
    await name.setValue('x');
    await name.setValue('   ');
    expect(await (await documentLoader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Name' }))).getTextErrors()).toEqual([
      'Name must not be empty',
    ]);
    await name.setValue('Harrowgate Ammonia Unit 4');
    await (await documentLoader.getHarness(MatButtonHarness.with({ text: 'Create' }))).click();
    const create = http.expectOne({ method: 'POST', url: '/api/projects' });
    expect(create.request.body).toEqual({ name: 'Harrowgate Ammonia Unit 4', site: '', unit: '', client: '', description: '' });
    const created = aProject({ id: '3c2b1a09-8f7e-4d6c-9b5a-4e3d2c1b0a04', name: 'Harrowgate Ammonia Unit 4', myRole: 'lead' });
    create.flush(created);
    await settle(harness.fixture);
    expect(TestBed.inject(Router).url).toBe(`/projects/${created.id}`);
  });
});

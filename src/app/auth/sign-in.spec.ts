import { HttpTestingController } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { aUser } from '../testing/fixtures';
import { SessionStore } from './session-store';
import { SignIn } from './sign-in';

@Component({ template: 'projects page' })
class ProjectsStandIn {}

describe('SignIn', () => {
  let http: HttpTestingController;

  async function setUp() {
    TestBed.configureTestingModule({
      providers: appTestProviders([
        { path: 'sign-in', component: SignIn },
        { path: 'projects', component: ProjectsStandIn },
        { path: 'projects/:projectId', component: ProjectsStandIn },
      ]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/sign-in?returnUrl=%2Fprojects%2Fabc', SignIn);
    const loader = TestbedHarnessEnvironment.loader(harness.fixture);
    const username = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=username]' }));
    const password = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }));
    const usernameField = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Username' }));
    const passwordField = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Password' }));
    const submit = await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }));
    return { harness, username, password, usernameField, passwordField, submit };
  }

  afterEach(() => http.verify());

  it('shows the shared schema message while typing, before the field is left', async () => {
    const { harness, username, usernameField } = await setUp();
    await username.setValue('m');
    await username.setValue('');
    await harness.fixture.whenStable();
    expect(await usernameField.getTextErrors()).toEqual(['Username must not be empty']);
    await username.setValue('mira.okafor');
    expect(await usernameField.getTextErrors()).toEqual([]);
  });

  it('refuses to send an empty form and marks both fields', async () => {
    const { harness, submit, usernameField, passwordField } = await setUp();
    await submit.click();
    await harness.fixture.whenStable();
    http.expectNone('/api/auth/sign-in');
    expect(await usernameField.getTextErrors()).toEqual(['Username must not be empty']);
    expect(await passwordField.getTextErrors()).toEqual(['Password must not be empty']);
  });

  it('signs in and goes back to the page the user came from', async () => {
    const { harness, username, password, submit } = await setUp();
    await username.setValue('mira.okafor');
    await password.setValue('correct horse battery');
    await submit.click();
    const request = http.expectOne('/api/auth/sign-in');
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({ username: 'mira.okafor', password: 'correct horse battery' });
    request.flush(aUser());
    await settle(harness.fixture);
    expect(TestBed.inject(Router).url).toBe('/projects/abc');
    expect(TestBed.inject(SessionStore).user()?.username).toBe('mira.okafor');
  });

  it('shows the server refusal on the form and stays there, keeping what was typed', async () => {
    const { harness, username, password, submit } = await setUp();
    await username.setValue('mira.okafor');
    await password.setValue('wrong password');
    await submit.click();
    http
      .expectOne('/api/auth/sign-in')
      .flush(
        { error: { code: 'invalid_credentials', message: 'wrong username or password' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    await settle(harness.fixture);
    const alert = harness.fixture.nativeElement.querySelector('[role=alert]') as HTMLElement;
    expect(alert.textContent?.trim()).toBe('wrong username or password');
    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fprojects%2Fabc');
    expect(await username.getValue()).toBe('mira.okafor');
    expect(await password.getValue()).toBe('wrong password');
  });
});

import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpClient } from '@angular/common/http';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component, ErrorHandler } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatSnackBarHarness } from '@angular/material/snack-bar/testing';
import { Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { firstValueFrom } from 'rxjs';
import { SessionStore } from '../auth/session-store';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { aUser } from '../testing/fixtures';
import { ApiError } from './api-error';

@Component({ template: 'a page' })
class PageStandIn {}

describe('httpErrorInterceptor and AppErrorHandler', () => {
  let http: HttpTestingController;

  async function setUp() {
    TestBed.configureTestingModule({
      providers: appTestProviders([
        { path: 'sign-in', component: PageStandIn },
        { path: 'projects/:projectId', component: PageStandIn },
      ]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create('/projects/p1');
    return harness;
  }

  afterEach(() => http.verify());

  it('sends the user to the sign-in page on a 401 and comes back to the same page after', async () => {
    const harness = await setUp();
    const session = TestBed.inject(SessionStore);
    const signIn = session.signIn({ username: 'mira.okafor', password: 'correct horse battery' });
    http.expectOne('/api/auth/sign-in').flush(aUser());
    await signIn;
    const reply = firstValueFrom(TestBed.inject(HttpClient).get('/api/projects'));
    http.expectOne('/api/projects').flush({ error: { code: 'unauthenticated', message: 'sign in first' } }, { status: 401, statusText: 'Unauthorized' });
    await expect(reply).rejects.toBeInstanceOf(ApiError);
    await settle(harness.fixture);
    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fprojects%2Fp1');
    expect(session.user()).toBeNull();
  });

  it('carries the server message, code and details into an ApiError', async () => {
    await setUp();
    const reply = firstValueFrom(TestBed.inject(HttpClient).post('/api/projects', {}));
    http.expectOne('/api/projects').flush(
      { error: { code: 'validation_failed', message: 'name: must not be empty', details: { issues: [{ path: 'name', message: 'must not be empty' }] } } },
      { status: 400, statusText: 'Bad Request' },
    );
    const error = await reply.catch((failure: unknown) => failure);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status: 400, code: 'validation_failed', message: 'name: must not be empty' });
    expect((error as ApiError).issues).toEqual([{ path: 'name', message: 'must not be empty' }]);
    expect(TestBed.inject(Router).url).toBe('/projects/p1');
  });

  it('explains a reply without the error body in its own words', async () => {
    await setUp();
    const reply = firstValueFrom(TestBed.inject(HttpClient).get('/api/projects'));
    http.expectOne('/api/projects').flush('<html>Bad gateway</html>', { status: 502, statusText: 'Bad Gateway' });
    await expect(reply).rejects.toMatchObject({ status: 502, message: 'The server answered 502 Bad Gateway without an explanation.' });
  });

  it('shows other errors in a snack bar with the server message', async () => {
    const harness = await setUp();
    const consoleError = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    TestBed.inject(ErrorHandler).handleError(new ApiError(403, 'forbidden', 'your role in this project does not allow this', null));
    await settle(harness.fixture);
    const snackBar = await TestbedHarnessEnvironment.documentRootLoader(harness.fixture).getHarness(MatSnackBarHarness);
    expect(await snackBar.getMessage()).toBe('your role in this project does not allow this');
    expect(consoleError).toHaveBeenCalledTimes(1);
    consoleError.mockRestore();
  });
});

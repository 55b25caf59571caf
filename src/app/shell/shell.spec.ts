import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatMenuHarness } from '@angular/material/menu/testing';
import { Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { SessionStore } from '../auth/session-store';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { aUser } from '../testing/fixtures';
import { SAFETY_CAUTION } from './safety-caution';
import { Shell } from './shell';

@Component({ template: 'page' })
class PageStandIn {}

describe('Shell', () => {
  let http: HttpTestingController;

  async function open(isAdmin: boolean) {
    TestBed.configureTestingModule({
      providers: appTestProviders([
        { path: 'sign-in', component: PageStandIn },
        { path: '', component: Shell, children: [{ path: 'projects', component: PageStandIn }] },
      ]),
    });
    http = TestBed.inject(HttpTestingController);
    const signIn = TestBed.inject(SessionStore).signIn({ username: 'mira.okafor', password: 'correct horse battery' });
    http.expectOne('/api/auth/sign-in').flush(aUser({ isAdmin }));
    await signIn;
    const harness = await RouterTestingHarness.create('/projects');
    await settle(harness.fixture);
    return { harness, element: harness.fixture.nativeElement as HTMLElement };
  }

  afterEach(() => http.verify());

  it('shows the product, the signed-in user and the caution in the footer', async () => {
    const { element } = await open(false);
    expect(element.querySelector('.product')?.textContent?.trim()).toBe('Proofline');
    expect(element.querySelector('mat-toolbar')?.textContent).toContain('Mira Okafor');
    expect(element.querySelector('footer')?.textContent?.trim()).toBe(SAFETY_CAUTION);
    expect(SAFETY_CAUTION).toContain('defer to IEC 61511 / IEC 61508 and local regulations');
  });

  it('shows the user accounts link to site admins only', async () => {
    const asEngineer = await open(false);
    expect(asEngineer.element.querySelector('a[href="/admin/users"]')).toBeNull();
    TestBed.resetTestingModule();
    const asAdmin = await open(true);
    expect(asAdmin.element.querySelector('a[href="/admin/users"]')?.textContent?.trim()).toBe('Users');
  });

  it('signs out from the account menu and goes to the sign-in page', async () => {
    const { harness } = await open(false);
    const menu = await TestbedHarnessEnvironment.loader(harness.fixture).getHarness(MatMenuHarness);
    await menu.open();
    await menu.clickItem({ text: /Sign out/ });
    const request = http.expectOne('/api/auth/sign-out');
    expect(request.request.method).toBe('POST');
    request.flush(null, { status: 204, statusText: 'No Content' });
    await settle(harness.fixture);
    expect(TestBed.inject(Router).url).toBe('/sign-in');
    expect(TestBed.inject(SessionStore).user()).toBeNull();
  });
});

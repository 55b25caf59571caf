import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { RouterTestingHarness } from '@angular/router/testing';
import type { ProjectRole } from '../../../shared/api/projects.js';
import type { Sif } from '../../../shared/api/sifs.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { PROJECT_ID, aProject, aSif } from '../testing/fixtures';
import { SifEditor } from './sif-editor';

@Component({ template: 'register' })
class RegisterStandIn {}

const SIFS_URL = `/api/projects/${PROJECT_ID}/sifs`;

describe('SifEditor', () => {
  let http: HttpTestingController;

  async function open(options: { record?: Sif; role?: ProjectRole } = {}) {
    TestBed.configureTestingModule({
      providers: appTestProviders([
        { path: 'projects/:projectId', component: RegisterStandIn },
        { path: 'projects/:projectId/sifs/new', component: SifEditor },
        { path: 'projects/:projectId/sifs/:sifId', component: SifEditor },
      ]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl(`/projects/${PROJECT_ID}/sifs/${options.record ? options.record.id : 'new'}`);
    await settle(harness.fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}`).flush(aProject({ myRole: options.role ?? 'engineer' }));
    if (options.record) http.expectOne(`${SIFS_URL}/${options.record.id}`).flush(options.record);
    await navigation;
    await settle(harness.fixture);
    const loader = TestbedHarnessEnvironment.loader(harness.fixture);
    const documentLoader = TestbedHarnessEnvironment.documentRootLoader(harness.fixture);
    const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    const select = (name: string) => loader.getHarness(MatSelectHarness.with({ selector: `[formControlName=${name}]` }));
    const field = (label: string | RegExp) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    const derived = (key: string) =>
      (harness.fixture.nativeElement.querySelector(`[data-derived=${key}]`) as HTMLElement | null)?.textContent?.trim() ?? null;
    return { harness, loader, documentLoader, input, select, field, derived };
  }

  afterEach(() => http.verify());

  describe('target entered once, the other forms derived', () => {
    it('derives SIL 2 and PFDavg 2e-3 from an RRF of 500 in low demand', async () => {
      // IEC 61508-1:2010 Table 2: SIL 2 is PFDavg >= 1e-3 to < 1e-2; RRF = 1 / PFDavg, so RRF 500 is PFDavg 0.002.
      const { select, input, derived } = await open();
      await (await select('targetKind')).clickOptions({ text: 'RRF' });
      await (await input('targetValue')).setValue('500');
      expect(derived('sil')).toBe('SIL 2');
      expect(derived('pfdAvg')).toBe('≤ 2.00e-3');
      expect(derived('rrf')).toBe('≥ 500');
      expect(derived('pfh')).toBeNull();
      expect(derived('band')).toBe('PFDavg from 1.00e-3 up to 1.00e-2');
    });

    it('derives the band limits of a SIL 3 target, exclusive at the upper bound', async () => {
      // IEC 61508-1:2010 Table 2: SIL 3 is PFDavg >= 1e-4 to < 1e-3, so RRF > 1000.
      const { select, derived } = await open();
      await (await select('targetValue')).clickOptions({ text: 'SIL 3' });
      expect(derived('sil')).toBe('SIL 3');
      expect(derived('pfdAvg')).toBe('< 1.00e-3');
      expect(derived('rrf')).toBe('> 1,000');
    });

    it('judges a high-demand target by PFH and shows no PFDavg or RRF', async () => {
      // IEC 61508-1:2010 Table 3: SIL 3 is PFH >= 1e-8 to < 1e-7 per hour.
      const { select, input, derived } = await open();
      await (await select('demandMode')).clickOptions({ text: 'High demand' });
      await (await select('targetKind')).clickOptions({ text: 'PFH (per hour)' });
      await (await input('targetValue')).setValue('5e-8');
      expect(derived('sil')).toBe('SIL 3');
      expect(derived('pfh')).toBe('≤ 5.00e-8 per hour');
      expect(derived('pfdAvg')).toBeNull();
      expect(derived('rrf')).toBeNull();
    });
  });

  describe('validation messages as the user types', () => {
    it('names what is wrong with the target value', async () => {
      const { select, input, field, derived } = await open();
      await (await select('targetKind')).clickOptions({ text: 'PFDavg' });
      const value = await input('targetValue');
      await value.setValue('abc');
      expect(await (await field('Target PFDavg')).getTextErrors()).toEqual(['Target value must be a number, e.g. 0.002 or 2e-3']);
      // PFDavg >= 0.1 is worse than SIL 1 (IEC 61508-1:2010 Table 2): no SIL-rated function is needed.
      await value.setValue('0.5');
      expect(await (await field('Target PFDavg')).getTextErrors()).toEqual([
        'A PFDavg target must be at least 0.00001 (SIL 4) and below 0.1 (SIL 1)',
      ]);
      expect(derived('sil')).toBeNull();
      await value.setValue('2e-3');
      expect(await (await field('Target PFDavg')).getTextErrors()).toEqual([]);
    });

    it('flags a target kind that the new demand mode does not take, and keeps the typed value', async () => {
      const { select, input, field } = await open();
      await (await select('targetKind')).clickOptions({ text: 'RRF' });
      await (await input('targetValue')).setValue('500');
      await (await select('demandMode')).clickOptions({ text: 'High demand' });
      expect(await (await field('Target given as')).getTextErrors()).toEqual([
        'A rrf target does not apply in high demand mode: give SIL or PFH (IEC 61508-1 Table 3)',
      ]);
      expect(await (await input('targetValue')).getValue()).toBe('500');
    });

    it('checks the demand rate against the demand mode and mission time as hours', async () => {
      const { input, field } = await open();
      await (await input('demandRatePerYear')).setValue('5');
      expect((await (await field(/Demand rate/)).getTextErrors())[0]).toMatch(/^Low demand mode means at most one demand per year/);
      await (await input('demandRatePerYear')).setValue('');
      expect(await (await field(/Demand rate/)).getTextErrors()).toEqual([]);
      await (await input('missionHours')).setValue('0');
      expect(await (await field('Mission time')).getTextErrors()).toEqual(['Mission time must be greater than 0']);
    });

    it('creates a SIF with the target stored once, as entered', async () => {
      const { harness, loader, select, input } = await open();
      await (await input('tag')).setValue('HS-401');
      await (await input('title')).setValue('Reactor R-401 high-pressure trip');
      await (await input('hazardousEvent')).setValue('Overpressure of R-401 and loss of containment.');
      await (await select('targetKind')).clickOptions({ text: 'RRF' });
      await (await input('targetValue')).setValue('500');
      await (await input('missionHours')).setValue('87600');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Create SIF' }))).click();
      const request = http.expectOne({ method: 'POST', url: SIFS_URL });
      expect(request.request.body).toEqual({
        tag: 'HS-401',
        title: 'Reactor R-401 high-pressure trip',
        hazardousEvent: 'Overpressure of R-401 and loss of containment.',
        demandMode: 'low',
        target: { kind: 'rrf', value: 500 },
        demandRatePerYear: null,
        missionHours: 87600,
      });
      request.flush(aSif({ tag: 'HS-401', target: { kind: 'rrf', value: 500 } }));
      await settle(harness.fixture);
      expect(harness.routeNativeElement?.textContent).toContain('register');
    });
  });

  it('shows a tag already taken in the project under the tag field and keeps the form', async () => {
    const record = aSif({ tag: 'HS-310' });
    const { harness, loader, input, field } = await open({ record });
    await (await input('tag')).setValue('HS-311');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
    http.expectOne({ method: 'PATCH', url: `${SIFS_URL}/${record.id}` }).flush(
      {
        error: {
          code: 'already_exists',
          message: 'tag: is already used by another SIF of this project',
          details: { issues: [{ path: 'tag', message: 'is already used by another SIF of this project' }] },
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle(harness.fixture);
    expect(await (await field('Tag')).getTextErrors()).toEqual(['Tag is already used by another SIF of this project']);
    expect(await (await input('tag')).getValue()).toBe('HS-311');
  });

  describe('a save that meets a newer version (409)', () => {
    async function saveStaleTitle() {
      const mine = aSif({ title: 'Reactor R-301 high-temperature trip', version: 1 });
      const theirs = { ...mine, title: 'Reactor R-301 temperature trip (renamed by a colleague)', version: 2 };
      const opened = await open({ record: mine });
      await (await opened.input('title')).setValue('Reactor R-301 high-high temperature trip');
      await (await opened.loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
      const request = http.expectOne({ method: 'PATCH', url: `${SIFS_URL}/${mine.id}` });
      expect(request.request.body).toEqual({ version: 1, title: 'Reactor R-301 high-high temperature trip' });
      request.flush(
        { error: { code: 'version_conflict', message: 'someone else saved this SIF first', details: { current: theirs } } },
        { status: 409, statusText: 'Conflict' },
      );
      await settle(opened.harness.fixture);
      const dialog = await opened.documentLoader.getHarness(MatDialogHarness);
      return { ...opened, mine, theirs, dialog };
    }

    it('shows both versions of the differing field and keeps the edits in the form', async () => {
      const { dialog, input } = await saveStaleTitle();
      const text = await (await dialog.host()).text();
      expect(text).toContain('Reactor R-301 high-high temperature trip');
      expect(text).toContain('Reactor R-301 temperature trip (renamed by a colleague)');
      expect(await (await input('title')).getValue()).toBe('Reactor R-301 high-high temperature trip');
    });

    it('"Keep mine and overwrite" saves the edits on top of the stored version', async () => {
      const { harness, documentLoader, input, mine, theirs } = await saveStaleTitle();
      await (await documentLoader.getHarness(MatButtonHarness.with({ text: 'Keep mine and overwrite' }))).click();
      await settle(harness.fixture);
      const retry = http.expectOne({ method: 'PATCH', url: `${SIFS_URL}/${mine.id}` });
      expect(retry.request.body).toEqual({ version: 2, title: 'Reactor R-301 high-high temperature trip' });
      retry.flush({ ...theirs, title: 'Reactor R-301 high-high temperature trip', version: 3 });
      await settle(harness.fixture);
      expect(await (await input('title')).getValue()).toBe('Reactor R-301 high-high temperature trip');
      expect(harness.fixture.nativeElement.textContent).toContain('Version 3');
    });

    it('"Reload theirs" puts the stored record in the form and bases the next save on its version', async () => {
      const { harness, documentLoader, loader, input, mine } = await saveStaleTitle();
      await (await documentLoader.getHarness(MatButtonHarness.with({ text: 'Reload theirs' }))).click();
      await settle(harness.fixture);
      http.expectNone({ method: 'PATCH' });
      expect(await (await input('title')).getValue()).toBe('Reactor R-301 temperature trip (renamed by a colleague)');
      await (await input('missionHours')).setValue('175200');
      await (await loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
      const next = http.expectOne({ method: 'PATCH', url: `${SIFS_URL}/${mine.id}` });
      expect(next.request.body).toEqual({ version: 2, missionHours: 175200 });
      next.flush({ ...mine, missionHours: 175200, version: 3 });
      await settle(harness.fixture);
    });

    it('"Decide later" closes the choice and loses nothing', async () => {
      const { harness, documentLoader, input } = await saveStaleTitle();
      await (await documentLoader.getHarness(MatButtonHarness.with({ text: 'Decide later' }))).click();
      await settle(harness.fixture);
      http.expectNone({ method: 'PATCH' });
      expect(await documentLoader.getAllHarnesses(MatDialogHarness)).toHaveLength(0);
      expect(await (await input('title')).getValue()).toBe('Reactor R-301 high-high temperature trip');
    });
  });

  it('says so when the SIF is not there or not visible to the user (404)', async () => {
    TestBed.configureTestingModule({
      providers: appTestProviders([{ path: 'projects/:projectId/sifs/:sifId', component: SifEditor }]),
    });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    const navigation = harness.navigateByUrl(`/projects/${PROJECT_ID}/sifs/missing-sif`);
    await settle(harness.fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}`).flush(aProject());
    http.expectOne(`${SIFS_URL}/missing-sif`).flush({ error: { code: 'not_found', message: 'no such SIF' } }, { status: 404, statusText: 'Not Found' });
    await navigation;
    await settle(harness.fixture);
    const element = harness.fixture.nativeElement as HTMLElement;
    expect(element.querySelector('h1')?.textContent?.trim()).toBe('SIF not found');
    expect(element.querySelector('[role=alert]')?.textContent).toContain('There is no such SIF');
    expect(element.querySelector('form')).toBeNull();
  });

  describe('what each role may do (from myRole)', () => {
    it('gives a viewer a read-only form without a save button', async () => {
      const { loader, input, select } = await open({ record: aSif(), role: 'viewer' });
      expect(await (await input('title')).isDisabled()).toBe(true);
      expect(await (await select('status')).isDisabled()).toBe(true);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Save changes' }))).toHaveLength(0);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Archive SIF/ }))).toHaveLength(0);
    });

    it('lets a reviewer move a SIF in review to approved or back to draft, and nothing else', async () => {
      const { loader, input, select } = await open({ record: aSif({ status: 'in-review' }), role: 'reviewer' });
      expect(await (await input('title')).isDisabled()).toBe(true);
      const status = await select('status');
      expect(await status.isDisabled()).toBe(false);
      await status.open();
      const options = await Promise.all((await status.getOptions()).map((option) => option.getText()));
      expect(options).toEqual(['Draft', 'In review', 'Approved']);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Save changes' }))).toHaveLength(1);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Archive SIF/ }))).toHaveLength(0);
    });

    it('lets an engineer edit and archive', async () => {
      const { loader, input } = await open({ record: aSif(), role: 'engineer' });
      expect(await (await input('title')).isDisabled()).toBe(false);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Archive SIF/ }))).toHaveLength(1);
    });
  });
});

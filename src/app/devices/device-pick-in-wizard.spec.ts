import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { PROJECT_ID, aSif } from '../testing/fixtures';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { ArchitectureWizard } from '../wizard/architecture-wizard';
import { deviceSummaryFixture } from './device-fixtures';

describe('device library in the architecture wizard', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('fills a subsystem device from the picked library record', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const sif = aSif();
    const fixture = TestBed.createComponent(ArchitectureWizard);
    fixture.componentRef.setInput('projectId', PROJECT_ID);
    fixture.componentRef.setInput('sifId', sif.id);
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/sifs/${sif.id}`).flush(sif);
    await settle(fixture);

    const loader = TestbedHarnessEnvironment.loader(fixture);
    const documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    await (await loader.getAllHarnesses(MatButtonHarness.with({ selector: '.pick-device' })))[0]!.click();
    await settle(fixture);
    http.expectOne('/api/devices').flush([deviceSummaryFixture()]);
    await settle(fixture);
    await (await documentLoader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Use Quillfen"]' }))).click();
    await settle(fixture);

    const inputs = await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=deviceLabel]' }));
    expect(await inputs[0]!.getValue()).toBe('Quillfen Instruments (fictional) QP-400 pressure transmitter (library v1)');
    // The wizard shows rates in FIT by default: 4e-8 /h = 40 FIT, 3.6e-7 /h = 360 FIT (1 FIT = 1e-9 /h).
    expect(await (await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=lambdaDU]' })))[0]!.getValue()).toBe('40');
    expect(await (await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=lambdaDD]' })))[0]!.getValue()).toBe('360');
  }, 30_000);
});

import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { BasicEvent, RateEvent } from '../../../../shared/model-file.js';
import { appTestProviders, settle } from '../../testing/app-test-providers';
import { EventProperties } from './event-properties';

@Component({
  imports: [EventProperties],
  template: `<pl-event-properties [event]="event()" [takenIds]="taken" (changed)="onChanged($event)" />`,
})
class Host {
  readonly event = signal<BasicEvent>({ id: 'PT-1', lambdaDU: 2e-7, lambdaDD: 8e-7, mttrHours: 8, proofTest: { intervalHours: 8760 } });
  readonly taken = new Set(['PT-1', 'PT-2', 'G1']);
  readonly emitted: BasicEvent[] = [];

  onChanged(event: BasicEvent): void {
    this.emitted.push(event);
    this.event.set(event);
  }
}

describe('EventProperties', () => {
  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    const fixture = TestBed.createComponent(Host);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    const select = (name: string) => loader.getHarness(MatSelectHarness.with({ selector: `[formControlName=${name}]` }));
    const errorOf = async (label: string) => (await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getTextErrors()).join(' ');
    const derived = (key: string) => (fixture.nativeElement.querySelector(`[data-derived=${key}]`) as HTMLElement).textContent?.trim();
    return { fixture, host: fixture.componentInstance, loader, input, select, errorOf, derived };
  }

  it('shows the stored rates in the chosen unit and stores what is typed per hour', async () => {
    const { host, input, select } = await open();
    // 1 FIT = 1e-9 per hour (common practice): 2e-7 /h is 200 FIT.
    await (await select('rateUnit')).clickOptions({ text: 'FIT' });
    expect(await (await input('lambdaDU')).getValue()).toBe('200');
    await (await input('lambdaDU')).setValue('500');
    const last = host.emitted.at(-1) as RateEvent;
    expect(last.lambdaDU).toBeCloseTo(5e-7, 18);
    expect(last.lambdaDD).toBeCloseTo(8e-7, 18);
    // 8760 h per year (common practice): 0.01752 per year is 2e-6 per hour.
    await (await select('rateUnit')).clickOptions({ text: 'per year' });
    await (await input('lambdaDU')).setValue('0.01752');
    expect((host.emitted.at(-1) as RateEvent).lambdaDU).toBeCloseTo(2e-6, 15);
  }, 20_000);

  it('converts test intervals typed in months or years to hours', async () => {
    const { host, input, select } = await open();
    // 12 months of 730 h = 8760 h is what is stored; shown in the default unit, months.
    expect(await (await input('proofInterval')).getValue()).toBe('12');
    await (await input('proofInterval')).setValue('6');
    expect((host.emitted.at(-1) as RateEvent).proofTest?.intervalHours).toBe(4380);
    await (await select('intervalUnit')).clickOptions({ text: 'years' });
    expect(await (await input('proofInterval')).getValue()).toBe('0.5');
    await (await input('proofInterval')).setValue('2');
    expect((host.emitted.at(-1) as RateEvent).proofTest?.intervalHours).toBe(17_520);
  }, 20_000);

  it('says what is wrong as the user types and emits nothing until it is fixed', async () => {
    const { host, input, errorOf } = await open();
    await (await input('lambdaDU')).setValue('-1');
    expect(await errorOf('λDU, dangerous undetected')).toBe('λDU must be 0 or more.');
    await (await input('lambdaDU')).setValue('two');
    expect(await errorOf('λDU, dangerous undetected')).toBe('λDU must be a number, e.g. 2.5e-7.');
    await (await input('proofInterval')).setValue('0');
    expect(await errorOf('Proof-test interval')).toBe('Proof-test interval must be more than 0.');
    await (await input('id')).setValue('PT-2');
    expect(await errorOf('Id')).toBe('Id "PT-2" is already used in this model.');
    expect(host.emitted).toEqual([]);
    await (await input('id')).setValue('PT-1');
    await (await input('proofInterval')).setValue('12');
    await (await input('lambdaDU')).setValue('3e-7');
    expect((host.emitted.at(-1) as RateEvent).lambdaDU).toBe(3e-7);
  }, 20_000);

  it('shows DC, SFF and tCE derived from the stored figures', async () => {
    const { derived } = await open();
    // DC = λDD / (λDD + λDU) = 8e-7 / 1e-6 = 80 % (IEC 61508-4 3.8.6); with λS = 0, SFF = λDD / λD = 80 %
    // (IEC 61508-2 Annex C); tCE = 0.2 (8760/2 + 8) + 0.8 · 8 = 884 h (IEC 61508-6 B.3.2.2.1), shown as 884 h.
    expect(derived('dc')).toBe('80.0 %');
    expect(derived('sff')).toBe('80.0 %');
    expect(derived('tce')).toBe('884 h');
  }, 20_000);

  it('turns the event into a fixed probability and back', async () => {
    const { fixture, host, loader, input, errorOf } = await open();
    const toggle = fixture.nativeElement.querySelectorAll('mat-button-toggle button')[1] as HTMLButtonElement;
    toggle.click();
    await settle(fixture);
    await (await input('probability')).setValue('0.002');
    expect(host.emitted.at(-1)).toEqual({ id: 'PT-1', probability: 0.002 });
    // Typed key by key, "1.5" passes through the valid "1"; the invalid 1.5 itself is never emitted.
    await (await input('probability')).setValue('1.5');
    expect(await errorOf('Probability of failure on demand')).toBe('Probability must be 1 or less.');
    expect(host.emitted.every((event) => 'probability' in event && event.probability <= 1)).toBe(true);
    expect(await loader.getAllHarnesses(MatCheckboxHarness)).toHaveLength(0);
  }, 20_000);
});

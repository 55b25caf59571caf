import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { DraftGate } from '../model-graph';
import { appTestProviders, settle } from '../../testing/app-test-providers';
import { GateProperties } from './gate-properties';

@Component({
  imports: [GateProperties],
  template: `<pl-gate-properties [gate]="gate()" [takenIds]="taken" (changed)="onChanged($event)" />`,
})
class Host {
  readonly gate = signal<DraftGate>({ id: 'G2', type: 'or', inputs: ['E1', 'E2', 'E3'] });
  readonly taken = new Set(['G2', 'E1', 'E2', 'E3']);
  readonly emitted: DraftGate[] = [];

  onChanged(gate: DraftGate): void {
    this.emitted.push(gate);
    this.gate.set(gate);
  }
}

describe('GateProperties', () => {
  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    const fixture = TestBed.createComponent(Host);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const text = (key: string) => (fixture.nativeElement.querySelector(`[data-derived=${key}]`) as HTMLElement | null)?.textContent?.trim();
    return { fixture, host: fixture.componentInstance, loader, text };
  }

  it('enters voting as M out of N to trip and stores k = N - M + 1', async () => {
    const { host, loader, text } = await open();
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: 'Voting: M out of N to trip' });
    const m = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=m]' }));
    // 2oo3 to trip: the group fails when 3 - 2 + 1 = 2 of its 3 inputs fail (IEC 61508-6 Annex B MooN).
    await m.setValue('2');
    expect(host.emitted.at(-1)).toEqual({ id: 'G2', type: 'atLeast', k: 2, inputs: ['E1', 'E2', 'E3'] });
    expect(text('k')).toBe('2');
    expect(text('voting')).toBe('2oo3 to trip');
    expect(text('logic')).toBe('fails when 2 of 3 inputs fail');
    // 1oo3 to trip: all three must fail (k = 3).
    await m.setValue('1');
    expect(host.emitted.at(-1)?.k).toBe(3);
    expect(text('logic')).toBe('fails when 3 of 3 inputs fail');
  }, 20_000);

  it('refuses M above the number of inputs, naming the bound', async () => {
    const { host, loader } = await open();
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: 'Voting: M out of N to trip' });
    const before = host.emitted.length;
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=m]' }))).setValue('4');
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'M to trip' }));
    expect(await field.getTextErrors()).toEqual(['M must be 3 or less.']);
    expect(host.emitted.length).toBe(before);
  }, 20_000);

  it('drops k when the gate becomes an OR gate again', async () => {
    const { host, loader } = await open();
    const logic = await loader.getHarness(MatSelectHarness);
    await logic.clickOptions({ text: 'Voting: M out of N to trip' });
    await logic.clickOptions({ text: 'OR: any input' });
    expect(host.emitted.at(-1)).toEqual({ id: 'G2', type: 'or', inputs: ['E1', 'E2', 'E3'] });
  }, 20_000);
});

import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { MarkovTransition } from '../../../../shared/model-file.js';
import { appTestProviders, settle } from '../../testing/app-test-providers';
import { blankModel, type DraftCommonCauseGroup, type EditableModel } from '../model-graph';
import { CcfProperties } from './ccf-properties';
import { ModelProperties, type ModelHeader } from './model-properties';
import { TransitionProperties } from './transition-properties';

@Component({
  imports: [CcfProperties, TransitionProperties, ModelProperties],
  template: `
    @if (form === 'group') {
      <pl-ccf-properties [group]="group()" [takenIds]="groupIds" (changed)="groups.push($event); group.set($event)" />
    } @else if (form === 'transition') {
      <pl-transition-properties [transition]="transition()" (changed)="transitions.push($event); transition.set($event)" />
    } @else {
      <pl-model-properties [model]="model" (changed)="headers.push($event)" />
    }
  `,
})
class Host {
  form: 'group' | 'transition' | 'model' = 'group';
  readonly group = signal<DraftCommonCauseGroup>({ id: 'CCF-PT', members: ['PT-1', 'PT-2'], beta: 0.05, model: 'beta' });
  readonly groupIds = new Set(['CCF-PT', 'CCF-XV']);
  readonly groups: DraftCommonCauseGroup[] = [];
  readonly transition = signal<MarkovTransition>({ from: 'OK', to: 'DU', rate: 2e-7 });
  readonly transitions: MarkovTransition[] = [];
  readonly model: EditableModel = blankModel('markov', 'Invented level switch', 87_600, 'low');
  readonly headers: ModelHeader[] = [];
}

async function open(form: Host['form']) {
  TestBed.configureTestingModule({ providers: appTestProviders() });
  const fixture = TestBed.createComponent(Host);
  fixture.componentInstance.form = form;
  await settle(fixture);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  return {
    host: fixture.componentInstance,
    input: (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` })),
    select: (name: string) => loader.getHarness(MatSelectHarness.with({ selector: `[formControlName=${name}]` })),
    errorOf: async (label: string) => (await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getTextErrors()).join(' '),
  };
}

describe('common-cause group properties', () => {
  it('enters β and βD in per cent and stores fractions; βD left empty is left out (it then equals β)', async () => {
    const { host, input } = await open('group');
    // β = 0.05 is shown as 5 % (IEC 61508-6 Annex D states β in per cent, from memory).
    expect(await (await input('beta')).getValue()).toBe('5');
    await (await input('beta')).setValue('10');
    expect(host.groups.at(-1)?.beta).toBeCloseTo(0.1, 15);
    expect(host.groups.at(-1)).not.toHaveProperty('betaD');
    await (await input('betaD')).setValue('5');
    expect(host.groups.at(-1)).toMatchObject({ beta: 0.1, betaD: 0.05, members: ['PT-1', 'PT-2'] });
  });

  it('refuses β above 100 % and an id another group has, naming the field', async () => {
    const { host, input, errorOf } = await open('group');
    await (await input('beta')).setValue('120');
    expect(await errorOf('β (DU failures)')).toBe('β must be 100 or less.');
    await (await input('beta')).setValue('2');
    await (await input('id')).setValue('CCF-XV');
    expect(await errorOf('Id')).toBe('Id "CCF-XV" is already used in this model.');
    expect(host.groups.every((group) => group.beta <= 1 && group.id !== 'CCF-XV')).toBe(true);
  });
});

describe('transition properties', () => {
  it('shows the rate in the chosen unit and stores it per hour', async () => {
    const { host, input, select } = await open('transition');
    // 1 FIT = 1e-9 per hour (common practice): 2e-7 /h is 200 FIT; 8760 h per year: 0.01752 /y = 2e-6 /h.
    await (await select('unit')).clickOptions({ text: 'FIT' });
    expect(await (await input('rate')).getValue()).toBe('200');
    await (await input('rate')).setValue('350');
    expect(host.transitions.at(-1)?.rate).toBeCloseTo(3.5e-7, 18);
    await (await select('unit')).clickOptions({ text: 'per year' });
    await (await input('rate')).setValue('0.01752');
    expect(host.transitions.at(-1)).toMatchObject({ from: 'OK', to: 'DU' });
    expect(host.transitions.at(-1)?.rate).toBeCloseTo(2e-6, 15);
  });

  it('refuses a negative rate with its message', async () => {
    const { host, input, errorOf } = await open('transition');
    await (await input('rate')).setValue('-1');
    expect(await errorOf('Rate')).toBe('Rate must be 0 or more.');
    expect(host.transitions.every((transition) => transition.rate >= 0)).toBe(true);
  });
});

describe('model properties', () => {
  it('enters the mission time in years or months and stores hours', async () => {
    const { host, input, select, errorOf } = await open('model');
    // 87,600 h is 10 years of 8760 h (common practice).
    expect(await (await input('missionTime')).getValue()).toBe('10');
    await (await input('missionTime')).setValue('20');
    expect(host.headers.at(-1)?.mission.hours).toBe(175_200);
    await (await select('unit')).clickOptions({ text: 'months' });
    await (await input('missionTime')).setValue('18');
    expect(host.headers.at(-1)?.mission.hours).toBe(13_140);
    await (await input('missionTime')).setValue('0');
    expect(await errorOf('Mission time')).toBe('Mission time must be more than 0.');
    expect(host.headers.every((header) => header.mission.hours > 0)).toBe(true);
  });
});

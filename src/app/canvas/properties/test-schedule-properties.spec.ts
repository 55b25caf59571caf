import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { markovModel, type MarkovTest } from '../../../../shared/model-file.js';
import { appTestProviders, settle } from '../../testing/app-test-providers';
import { updateTests, type MarkovDraft } from '../model-graph';
import { PropertiesPanel, type PanelEdit } from './properties-panel';
import { TestScheduleProperties, moveProblems } from './test-schedule-properties';
import { newTestSchedule } from './test-schedules';

/** 87,600 h: a ten-year mission of 8760 h years (common practice). */
const MISSION_HOURS = 87_600;

@Component({
  imports: [TestScheduleProperties],
  template: `<pl-test-schedule-properties [test]="test()" [states]="states" [missionHours]="mission" (changed)="onChanged($event)" />`,
})
class Host {
  readonly test = signal<MarkovTest>({ intervalHours: 8760, moves: [{ from: 'DU', to: 'OK', probability: 1 }] });
  readonly states = ['OK', 'DU', 'DD'];
  readonly mission = MISSION_HOURS;
  readonly emitted: MarkovTest[] = [];

  onChanged(test: MarkovTest): void {
    this.emitted.push(test);
    this.test.set(test);
  }
}

/** An invented single-channel state model: working, failed undetected, failed detected. */
function channelModel(): MarkovDraft {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Invented level switch',
    kind: 'markov',
    mission: { hours: MISSION_HOURS, demand: 'low' },
    layout: {},
    states: [
      { id: 'OK', initial: 1 },
      { id: 'DU', down: true },
      { id: 'DD', down: true },
    ],
    transitions: [
      { from: 'OK', to: 'DU', rate: 2e-7 },
      { from: 'OK', to: 'DD', rate: 8e-7, detected: true },
      { from: 'DD', to: 'OK', rate: 0.125 },
    ],
  };
}

@Component({
  imports: [PropertiesPanel],
  template: `<pl-properties-panel [model]="model()" [nodeIds]="[]" [connectionIds]="[]" [issuesById]="issues" (edited)="onEdited($event)" />`,
})
class PanelHost {
  readonly model = signal<MarkovDraft>(channelModel());
  readonly issues = new Map<string, readonly string[]>();
  readonly edits: MarkovDraft[] = [];

  onEdited(edit: PanelEdit): void {
    this.edits.push(edit.model as MarkovDraft);
    this.model.set(edit.model as MarkovDraft);
  }
}

async function open() {
  TestBed.configureTestingModule({ providers: appTestProviders() });
  const fixture = TestBed.createComponent(Host);
  await settle(fixture);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const element = fixture.nativeElement as HTMLElement;
  return {
    fixture,
    host: fixture.componentInstance,
    loader,
    input: (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` })),
    probability: async (row: number) => (await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=probability]' })))[row - 1],
    select: async (name: string, row = 1) => (await loader.getAllHarnesses(MatSelectHarness.with({ selector: `[formControlName=${name}]` })))[row - 1],
    problems: () => [...element.querySelectorAll('.move-problems li')].map((item) => item.textContent?.trim()),
    fieldErrors: () => [...element.querySelectorAll('mat-error')].map((item) => item.textContent?.trim()).filter(Boolean),
    derived: () => element.querySelector('[data-derived=test-count]')?.textContent?.trim(),
  };
}

describe('TestScheduleProperties', () => {
  it('shows the interval in the chosen unit, stores hours, and says when the tests fall in the mission', async () => {
    const { host, input, select, derived } = await open();
    // 8760 h is 12 months of 730 h (common practice, src/app/units/units.ts).
    expect(await (await input('interval')).getValue()).toBe('12');
    // Tests at 1, 2, ... 9 years: the one at 10 years is the mission end, and tests happen strictly
    // before it (docs/model-format.md, tests[]).
    expect(derived()).toBe('9 in the mission: at 1 y, then every 1 y, the last at 9 y');
    await (await input('interval')).setValue('6');
    expect(host.emitted.at(-1)?.intervalHours).toBe(4380);
    await (await select('unit')).clickOptions({ text: 'years' });
    expect(await (await input('interval')).getValue()).toBe('0.5');
    await (await input('interval')).setValue('2');
    expect(host.emitted.at(-1)?.intervalHours).toBe(17_520);
    await (await input('first')).setValue('0.5');
    expect(host.emitted.at(-1)).toMatchObject({ intervalHours: 17_520, firstHours: 4380 });
    // First at 0.5 y, then every 2 y: 0.5, 2.5, ... 8.5 y, five tests before 10 y.
    expect(derived()).toBe('5 in the mission: at 6 mo, then every 2 y, the last at 102 mo');
  });

  it('names the row whose moves out of a state do not sum to 1, and still keeps what was typed', async () => {
    const { fixture, host, loader, probability, select, problems } = await open();
    await (await probability(1)).setValue('0.9');
    expect(problems()).toEqual(['The moves out of DU (row 1) sum to 0.9, not 1: a test sends each state\'s probability somewhere, all of it.']);
    // The unfinished draft is stored as typed (the model's own check lists the sum too), so nothing is lost.
    expect(host.emitted.at(-1)?.moves).toEqual([{ from: 'DU', to: 'OK', probability: 0.9 }]);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a row/ }))).click();
    await settle(fixture);
    // The new row starts from the state of the row above; it stays out of the model until it is complete.
    expect(await (await select('from', 2)).getValueText()).toBe('DU');
    await (await select('to', 2)).clickOptions({ text: 'DU' });
    expect(problems()).toContain('Row 2: Probability is required.');
    await (await probability(2)).setValue('0.1');
    expect(problems()).toEqual([]);
    expect(host.emitted.at(-1)?.moves).toEqual([
      { from: 'DU', to: 'OK', probability: 0.9 },
      { from: 'DU', to: 'DU', probability: 0.1 },
    ]);
  });

  it('refuses a probability outside [0, 1] in its row and keeps the stored rows', async () => {
    const { fixture, host, loader, probability, select, problems } = await open();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a row/ }))).click();
    await settle(fixture);
    await (await select('from', 2)).clickOptions({ text: 'DD' });
    await (await probability(2)).setValue('1.5');
    expect(problems()).toContain('Row 2: Probability must be 1 or less.');
    expect(host.emitted.at(-1)?.moves).toEqual([{ from: 'DU', to: 'OK', probability: 1 }]);
    expect(await (await probability(2)).getValue()).toBe('1.5');
    await (await probability(2)).setValue('1');
    expect(problems()).toEqual([]);
    expect(host.emitted.at(-1)?.moves).toEqual([
      { from: 'DU', to: 'OK', probability: 1 },
      { from: 'DD', to: 'OK', probability: 1 },
    ]);
  });

  it('refuses an interval after the mission end and a first test at 0, with the stored times kept', async () => {
    const { host, input, fieldErrors } = await open();
    await (await input('interval')).setValue('121');
    expect(fieldErrors()).toContain('Test interval is after the mission end (10 y).');
    await (await input('first')).setValue('0');
    expect(fieldErrors()).toContain('First test must be more than 0.');
    expect(host.emitted.every((test) => test.intervalHours <= MISSION_HOURS && (test.firstHours ?? 1) > 0)).toBe(true);
    await (await input('interval')).setValue('24');
    expect(host.emitted.at(-1)?.intervalHours).toBe(17_520);
    expect(host.emitted.at(-1)?.firstHours).toBeUndefined();
  });

  it('says which row names a state the chain does not have', async () => {
    const { host, fixture, problems } = await open();
    host.test.set({ intervalHours: 8760, moves: [{ from: 'GONE', to: 'OK', probability: 1 }] });
    await settle(fixture);
    expect(problems()).toContain('Row 1: the state "GONE" is not in this chain; pick one of its states.');
  });
});

describe('moveProblems', () => {
  it('sums each state\'s rows across the table and leaves out rows not yet numbers', () => {
    const problems = moveProblems(
      [
        { from: 'DU', to: 'OK', probability: '0.7' },
        { from: 'DD', to: 'OK', probability: '1' },
        { from: 'DU', to: 'DU', probability: '0.2' },
        { from: 'DU', to: 'DD', probability: 'x' },
      ],
      ['OK', 'DU', 'DD'],
    );
    expect(problems).toEqual([{ rows: [1, 3], message: 'The moves out of DU (rows 1, 3) sum to 0.9, not 1: a test sends each state\'s probability somewhere, all of it.' }]);
    // 0.1 + 0.2 + 0.7 is 1 within the model file's tolerance (1e-9), though not exactly in binary.
    expect(moveProblems(['0.1', '0.2', '0.7'].map((probability, index) => ({ from: 'DU', to: ['OK', 'DU', 'DD'][index], probability })), ['OK', 'DU', 'DD'])).toEqual([]);
  });
});

describe('test schedules in the properties panel', () => {
  it('adds a valid yearly test restoring each down state, edits it and removes it', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    const fixture = TestBed.createComponent(PanelHost);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const host = fixture.componentInstance;
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a test schedule/ }))).click();
    await settle(fixture);
    expect(host.model().tests).toEqual([
      {
        intervalHours: 8760,
        moves: [
          { from: 'DU', to: 'OK', probability: 1 },
          { from: 'DD', to: 'OK', probability: 1 },
        ],
      },
    ]);
    // The result is a complete model file: the server's own check (shared/model-file.ts) accepts it.
    expect(markovModel.safeParse(host.model()).success).toBe(true);
    const probabilities = await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=probability]' }));
    await probabilities[0].setValue('0.95');
    expect(host.model().tests?.[0].moves[0].probability).toBe(0.95);
    const check = markovModel.safeParse(host.model());
    expect(check.success).toBe(false);
    expect(check.error?.issues.map((issue) => issue.message)).toContain('test 0: the moves out of "DU" sum to 0.95, not 1');
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Remove Test 1"]' }))).click();
    await settle(fixture);
    expect('tests' in host.model()).toBe(false);
  });

  it('gives each independent part its own schedules', () => {
    const model = channelModel();
    const part = { id: 'P2', states: [{ id: 'UP', initial: 1 }, { id: 'FAILED', down: true }], transitions: [{ from: 'UP', to: 'FAILED', rate: 1e-6 }] };
    const test = newTestSchedule(part, 4380)!;
    expect(test).toEqual({ intervalHours: 4380, moves: [{ from: 'FAILED', to: 'UP', probability: 1 }] });
    const withPart: MarkovDraft = { ...model, parts: [part] };
    const tested = updateTests(withPart, 'P2', [test]);
    expect(tested.parts?.[0].tests).toEqual([test]);
    expect('tests' in tested).toBe(false);
    expect(markovModel.safeParse(tested).success).toBe(true);
    const untested = updateTests(tested, 'P2', []);
    expect('tests' in untested.parts![0]).toBe(false);
    expect(newTestSchedule({ ...model, states: [{ id: 'ONLY', initial: 1 }] }, MISSION_HOURS)).toEqual({ intervalHours: 8760, moves: [{ from: 'ONLY', to: 'ONLY', probability: 1 }] });
    expect(newTestSchedule({ ...model, states: [] }, MISSION_HOURS)).toBeNull();
  });
});

import { describe, expect, it } from 'vitest';
import { architecture } from '../../../shared/architecture.js';
import { generateModels } from '../../../solver/generator/index.js';
import { deviceVersionFixture } from '../devices/device-fixtures';
import { architectureFromForm, buildWizardForm, linkDevice, linkedDifferences, subsystemLinks, unlinkDevice } from './wizard-form';

describe('the architecture wizard form', () => {
  function filledForm() {
    const form = buildWizardForm('TZT-1310 from the architecture', 87_600, 'low');
    const [sensors, logic, valves] = form.controls.subsystems.controls;
    sensors.patchValue({ m: '2', n: '3', lambdaDU: '300', lambdaDD: '1200', betaPercent: '5' });
    logic.patchValue({ lambdaDU: '20' });
    valves.patchValue({ m: '1', n: '2', rateUnit: 'perHour', lambdaDU: '2e-6', proofInterval: '1', intervalUnit: 'years', betaPercent: '10' });
    return form;
  }

  it('describes subsystems in series with MooN voting, rates per hour and intervals in hours', () => {
    const value = architectureFromForm(filledForm());
    expect(architecture.safeParse(value).success).toBe(true);
    const [sensors, logic, valves] = value.groups;
    expect(sensors.voting).toBe('2oo3');
    // 300 FIT = 3e-7 /h (1 FIT = 1e-9 /h, common practice); 12 months = 8760 h.
    // Relative tolerance 1e-12 on the converted rates (300 × 1e-9 is not exact in binary).
    const channels = sensors.channels as { identical: { lambdaDU: number; lambdaDD?: number; mttrHours: number; proofTest?: unknown }; count: number };
    expect(channels.count).toBe(3);
    expect(channels.identical.lambdaDU).toBeCloseTo(3e-7, 18);
    expect(channels.identical.lambdaDD).toBeCloseTo(1.2e-6, 17);
    expect(channels.identical.mttrHours).toBe(8);
    expect(channels.identical.proofTest).toEqual({ intervalHours: 8760, coverage: 1 });
    expect(sensors.beta).toBe(0.05);
    expect(logic.voting).toBe('1oo1');
    expect(logic.beta).toBeUndefined();
    expect(valves.voting).toBe('1oo2');
    expect(value.mission).toEqual({ hours: 87_600, demand: 'low' });
  });

  it('writes a fault tree through the generator whose voting gates store k = N - M + 1', () => {
    const { faultTree } = generateModels(architecture.parse(architectureFromForm(filledForm())));
    const gates = new Map(faultTree.gates.map((gate) => [gate.id, gate]));
    // 2oo3 to trip fails when 2 of 3 fail; 1oo2 to trip fails when both fail (IEC 61508-6 Annex B MooN).
    expect(gates.get('PT')).toMatchObject({ type: 'atLeast', k: 2 });
    expect(gates.get('XV')).toMatchObject({ type: 'atLeast', k: 2 });
    expect(faultTree.events).toHaveLength(6);
    expect(faultTree.ccf?.map((group) => group.beta)).toEqual([0.05, 0.1]);
  });

  it('fills the linked fields from a library version in the chosen unit and uses its exact figures', () => {
    const form = filledForm();
    const valves = form.controls.subsystems.at(2);
    // 1.23456789e-7 /h is shown to six digits as 0.00108148 per year (8760 h a year, common practice).
    const version = deviceVersionFixture({ lambdaDU: 1.23456789e-7, lambdaDD: 0, proofTestCoverage: 0.75 });
    valves.patchValue({ rateUnit: 'perYear', mttrHours: '24' });
    linkDevice(valves, version);
    expect(valves.getRawValue()).toMatchObject({ deviceLabel: 'Quillfen Instruments (fictional) QP-400 pressure transmitter', lambdaDU: '0.00108148', lambdaDD: '0', proofCoverage: '75', mttrHours: '24' });
    expect(linkedDifferences(valves)).toEqual([]);
    const channel = (architectureFromForm(form).groups[2].channels as { identical: { lambdaDU: number; proofTest?: { coverage?: number } } }).identical;
    // The figure the field shows is rounded; the channel gets the library's own value.
    expect(channel.lambdaDU).toBe(1.23456789e-7);
    expect(channel.proofTest?.coverage).toBe(0.75);
    expect(subsystemLinks(form)).toEqual({ links: new Map([['XV', { version, overrides: [] }]]), problems: [] });
  });

  it('needs a reason for a linked figure typed differently, then keeps it as an override', () => {
    const form = filledForm();
    const sensors = form.controls.subsystems.at(0);
    linkDevice(sensors, deviceVersionFixture());
    sensors.patchValue({ lambdaDD: '', proofCoverage: '80' });
    expect(linkedDifferences(sensors).map((difference) => [difference.field, difference.libraryText])).toEqual([
      ['lambdaDD', '360 FIT'],
      ['proofTest.coverage', '90 %'],
    ]);
    expect(subsystemLinks(form).problems).toEqual([
      'Subsystem 1: λDD (library 360 FIT), Proof-test coverage (library 90 %) differ from Quillfen Instruments (fictional) QP-400 pressure transmitter version 1; give the reason for the override or restore the library values.',
    ]);
    sensors.patchValue({ overrideReason: '  Partial stroke only (invented)  ' });
    const { links, problems } = subsystemLinks(form);
    expect(problems).toEqual([]);
    expect(links.get('PT')?.overrides).toEqual([
      { field: 'lambdaDD', reason: 'Partial stroke only (invented)' },
      { field: 'proofTest.coverage', reason: 'Partial stroke only (invented)' },
    ]);
    unlinkDevice(sensors);
    expect(subsystemLinks(form).links.size).toBe(0);
    expect(sensors.controls.proofCoverage.value).toBe('80');
  });

  it('is refused by the architecture schema when N does not match the voting', () => {
    const form = filledForm();
    form.controls.subsystems.at(0).patchValue({ m: '4', n: '3' });
    const result = architecture.safeParse(architectureFromForm(form));
    expect(result.success).toBe(false);
    expect(result.error?.issues[0].message).toContain('more channels to act than there are');
  });
});

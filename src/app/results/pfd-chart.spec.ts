import { NO_ERRORS_SCHEMA } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import type { SolveResult } from '../../../shared/solve-result.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { PfdChart } from './pfd-chart';

/** An invented result: one channel, lambda = 1e-7 per hour, never tested over 10 years. */
function result(demand: SolveResult['demand'], withFrequency: boolean): SolveResult {
  const lambda = 1e-7;
  const hours = Array.from({ length: 11 }, (_, index) => index * 8760);
  return {
    method: 'fault-tree',
    algorithm: 'spec',
    solverVersion: '1.0.0',
    demand,
    missionHours: 87_600,
    pfdAvg: 4.3e-3,
    pfdMax: 8.7e-3,
    pfh: 9.96e-8,
    rrf: 232,
    sil: 3,
    // PFD(t) = 1 - exp(-lambda t) and w(t) = lambda exp(-lambda t) (exponential law, exact).
    curve: { hours, pfd: hours.map((t) => 1 - Math.exp(-lambda * t)), ...(withFrequency ? { frequency: hours.map((t) => lambda * Math.exp(-lambda * t)) } : {}) },
    simplified: [],
    cutSets: [],
    importance: [],
    warnings: [],
  };
}

describe('PfdChart', () => {
  async function render(value: SolveResult) {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    // jsdom draws no canvas: the chart directive is left out; its options are checked in chart-options.spec.ts.
    TestBed.overrideComponent(PfdChart, { set: { imports: [MatButtonToggleGroup, MatButtonToggle], schemas: [NO_ERRORS_SCHEMA] } });
    const fixture = TestBed.createComponent(PfdChart);
    fixture.componentRef.setInput('result', value);
    fixture.componentRef.setInput('target', value.demand === 'low' ? 1e-2 : 1e-6);
    await settle(fixture);
    return { fixture, element: fixture.nativeElement as HTMLElement };
  }

  it('shows the PFH view first in high demand, and PFD(t) on request', async () => {
    const { fixture, element } = await render(result('high', true));
    expect(element.querySelector('[data-pfd-chart]')?.getAttribute('data-view')).toBe('pfh');
    expect(element.querySelector('[data-pfd-chart]')?.getAttribute('aria-label')).toContain('w(t)');
    [...element.querySelectorAll<HTMLButtonElement>('mat-button-toggle button')].find((button) => button.textContent?.includes('PFD(t)'))!.click();
    await settle(fixture);
    expect(element.querySelector('[data-pfd-chart]')?.getAttribute('data-view')).toBe('pfd');
  });

  it('shows PFD(t) first in low demand and lets the user switch to the PFH view', async () => {
    const { fixture, element } = await render(result('low', true));
    expect(element.querySelector('[data-pfd-chart]')?.getAttribute('data-view')).toBe('pfd');
    element.querySelector<HTMLButtonElement>('[data-pfh-view] button')!.click();
    await settle(fixture);
    expect(element.querySelector('[data-pfd-chart]')?.getAttribute('data-view')).toBe('pfh');
  });

  it('says so in the chart place when the result has no w(t), and draws nothing made up', async () => {
    const { element } = await render(result('high', false));
    expect(element.querySelector('[data-pfd-chart]')).toBeNull();
    const note = element.querySelector('[data-no-frequency]')?.textContent ?? '';
    expect(note).toContain('no failure frequency curve w(t)');
    expect(note).toContain('9.96e-8 per hour');
  });
});

import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { Annotation } from '../../../shared/api/annotations.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { PinMarker } from './pin-marker';
import { ReviewPins, pinLabel, pinsOf } from './review-pins';

// What a pin shows is our own rule (common practice for review markers: the most pressing open comment wins).

let next = 0;
function thread(overrides: Partial<Annotation>): Annotation {
  next += 1;
  return {
    id: `00000000-0000-4000-8000-${String(next).padStart(12, '0')}`,
    projectId: '00000000-0000-4000-8000-000000000001',
    sifId: '00000000-0000-4000-8000-000000000002',
    modelId: '00000000-0000-4000-8000-000000000003',
    revision: 1,
    target: { kind: 'gate', itemId: 'TOP' },
    severity: 'remark',
    status: 'open',
    body: 'A comment.',
    authorId: '00000000-0000-4000-8000-000000000004',
    authorDisplayName: 'Rhea',
    createdAt: '2026-12-02T04:00:00.000Z',
    resolvedById: null,
    resolvedAt: null,
    outdated: false,
    outdatedBecause: null,
    solveId: null,
    replies: [],
    ...overrides,
  };
}

describe('pinsOf', () => {
  it('counts the threads per item and keeps the highest open severity, ignoring resolved ones for the colour', () => {
    const resolvedMustFix = thread({ severity: 'must-fix', status: 'resolved' });
    const question = thread({ severity: 'question' });
    const remark = thread({ severity: 'remark' });
    const pin = pinsOf([resolvedMustFix, question, remark]).get('gate:TOP')!;
    expect(pin).toEqual({ key: 'gate:TOP', count: 3, openCount: 2, severity: 'remark', outdated: false, firstThreadId: question.id });
  });

  it('keys items as the canvas names them, leaves out the whole model and result figures, and marks outdated pins', () => {
    const pins = pinsOf([
      thread({ target: { kind: 'state', itemId: 'pump/OK' }, outdated: true }),
      thread({ target: { kind: 'transition', itemId: 'OK->FAILED' } }),
      thread({ target: { kind: 'model', itemId: null } }),
      thread({ target: { kind: 'result', itemId: 'pfdAvg' } }),
    ]);
    expect([...pins.keys()]).toEqual(['state:pump/OK', 'transition:OK->FAILED']);
    expect(pins.get('state:pump/OK')!.outdated).toBe(true);
  });

  it('has no colour once every thread is resolved, and says so in words', () => {
    const pin = pinsOf([thread({ status: 'resolved', severity: 'must-fix' })]).get('gate:TOP')!;
    expect(pin.severity).toBeNull();
    expect(pinLabel(pin)).toBe('1 annotation (all resolved); open in the review panel');
    const outdated = pinsOf([thread({ severity: 'must-fix', outdated: true }), thread({ severity: 'question' })]).get('gate:TOP')!;
    expect(pinLabel(outdated)).toBe('2 annotations (2 open, highest must-fix, outdated: the item changed since); open in the review panel');
  });
});

@Component({
  imports: [PinMarker],
  template: `<div class="card" (click)="cardClicks.set(cardClicks() + 1)"><pl-pin-marker [itemKey]="key()" /></div>`,
})
class Host {
  readonly key = signal<string | undefined>('event:LS-A');
  readonly cardClicks = signal(0);
}

describe('PinMarker', () => {
  it('draws nothing for an item without threads, and a counted, coloured marker that asks for its thread on click', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    const fixture = TestBed.createComponent(Host);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    expect(element.querySelector('[data-pin]')).toBeNull();

    const pins = TestBed.inject(ReviewPins);
    const mustFix = thread({ target: { kind: 'event', itemId: 'LS-A' }, severity: 'must-fix' });
    pins.show([mustFix, thread({ target: { kind: 'event', itemId: 'LS-A' }, severity: 'question', outdated: true })]);
    await settle(fixture);
    const marker = element.querySelector<HTMLButtonElement>('[data-pin="event:LS-A"]')!;
    expect(marker.textContent?.trim()).toBe('2!');
    expect(marker.dataset['severity']).toBe('must-fix');
    expect(marker.classList).toContain('outdated');

    marker.click();
    expect(pins.requested()).toEqual({ threadId: mustFix.id });
    // The click stays on the marker: the card under it is not selected.
    expect(fixture.componentInstance.cardClicks()).toBe(0);
  });
});

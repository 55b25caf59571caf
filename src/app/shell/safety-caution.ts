import { ChangeDetectionStrategy, Component } from '@angular/core';

/** The caution every Proofline screen carries. */
export const SAFETY_CAUTION =
  'Proofline supports and does not replace competent functional-safety judgement; defer to IEC 61511 / IEC 61508 and local regulations.';

@Component({
  selector: 'pl-safety-caution',
  template: '<p class="caution" role="note">{{ caution }}</p>',
  styles: `
    .caution {
      margin: 0;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SafetyCaution {
  protected readonly caution = SAFETY_CAUTION;
}

import { ChangeDetectionStrategy, Component } from '@angular/core';
import { SAFETY_CAUTION } from './safety-caution';

@Component({
  selector: 'pl-about',
  template: `
    <section class="page about">
      <h1>About Proofline</h1>
      <p>
        Proofline keeps a team's register of safety instrumented functions in one place: each function's tag,
        the hazardous event it protects against, its demand mode and the target its hazard analysis gave it,
        with accounts and per-project roles so that leads, engineers, reviewers and viewers each see and do
        what their role allows.
      </p>
      <h2>Caution</h2>
      <p class="caution" role="note">{{ caution }}</p>
    </section>
  `,
  styles: `
    .about {
      max-width: 760px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
    }
    h2 {
      font: var(--mat-sys-title-medium);
    }
    .caution {
      padding: 12px 16px;
      border-left: 4px solid var(--mat-sys-tertiary);
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
      border-radius: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class About {
  protected readonly caution = SAFETY_CAUTION;
}

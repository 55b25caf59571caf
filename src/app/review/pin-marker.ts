import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { ReviewPins, pinLabel } from './review-pins';

/**
 * A review pin on a canvas item: a small tag at the item's corner with the number of threads, coloured by
 * the highest open severity, striped when outdated. Renders nothing when the item has no thread.
 */
@Component({
  selector: 'pl-pin-marker',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @if (pin(); as shown) {
      <button
        type="button"
        class="pin"
        [attr.data-pin]="shown.key"
        [attr.data-severity]="shown.severity ?? 'resolved'"
        [class.outdated]="shown.outdated"
        [attr.aria-label]="label()"
        [attr.title]="label()"
        (pointerdown)="$event.stopPropagation()"
        (mousedown)="$event.stopPropagation()"
        (keydown)="$event.stopPropagation()"
        (click)="$event.stopPropagation(); pins.open(shown.key)"
      >
        <span class="count">{{ shown.count }}</span>
        @if (shown.outdated) {
          <span class="flag" aria-hidden="true">!</span>
        }
      </button>
    }
  `,
  styles: `
    :host {
      position: absolute;
      top: -12px;
      right: -10px;
      z-index: 2;
    }

    .pin {
      display: inline-flex;
      align-items: center;
      gap: 2px;
      min-width: 24px;
      height: 22px;
      padding: 0 7px;
      border: 2px solid var(--mat-sys-surface);
      border-radius: 11px 11px 11px 3px;
      background: var(--pin-colour);
      color: var(--pin-text);
      font: var(--mat-sys-label-medium);
      font-weight: 700;
      box-shadow: 0 1px 3px rgb(0 0 0 / 30%);
      cursor: pointer;
      --pin-colour: var(--mat-sys-outline);
      --pin-text: var(--mat-sys-surface);
    }

    .pin[data-severity='must-fix'] {
      --pin-colour: var(--mat-sys-error);
      --pin-text: var(--mat-sys-on-error);
    }

    .pin[data-severity='remark'] {
      --pin-colour: var(--mat-sys-tertiary);
      --pin-text: var(--mat-sys-on-tertiary);
    }

    .pin[data-severity='question'] {
      --pin-colour: var(--mat-sys-primary);
      --pin-text: var(--mat-sys-on-primary);
    }

    .pin.outdated {
      background: repeating-linear-gradient(135deg, var(--pin-colour) 0 4px, color-mix(in srgb, var(--pin-colour) 55%, var(--mat-sys-surface)) 4px 8px);
    }

    .pin:focus-visible {
      outline: 3px solid var(--mat-sys-primary);
      outline-offset: 2px;
    }
  `,
})
export class PinMarker {
  protected readonly pins = inject(ReviewPins);

  /** The item's key (shared/model-diff itemKey); nothing is drawn while undefined or without threads. */
  readonly itemKey = input<string | undefined>(undefined);

  protected readonly pin = computed(() => {
    const key = this.itemKey();
    return key === undefined ? undefined : this.pins.pins().get(key);
  });
  protected readonly label = computed(() => {
    const pin = this.pin();
    return pin ? pinLabel(pin) : '';
  });
}

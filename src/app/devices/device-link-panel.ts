import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, output, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import type { DeviceSummary, DeviceVersion } from '../../../shared/api/devices.js';
import type { LinkedEventField, RateEvent } from '../../../shared/model-file.js';
import { formatTyped } from '../units/units';
import { LINKED_FIELD_LABELS, linkEvent, linkedFieldStates, newerVersionAvailable, overrideField, restoreField, unlinkEvent, updateLink } from './device-link';
import { DeviceLibrary } from './device-library';
import { DevicePickerDialog, type DevicePickerDialogData } from './device-picker-dialog';

/**
 * The library link of one rate event, for a properties panel: pick a device (its figures fill in),
 * see each linked field as linked or overridden, give a reason for a changed value, and update to a
 * newer library version. Every change leaves through `eventChange` as a new event.
 */
@Component({
  selector: 'pl-device-link-panel',
  imports: [MatButton, MatFormField, MatLabel, MatInput, MatIcon],
  template: `
    <section class="link" aria-label="Device library link">
      @if (event().device; as link) {
        <div class="head">
          <mat-icon aria-hidden="true">link</mat-icon>
          <span class="linked-to">
            @if (linked(); as version) {
              Linked to {{ version.maker }} {{ version.model }}, version {{ version.version }}
            } @else {
              Linked to library version {{ link.version }}
            }
          </span>
        </div>
        @if (current()?.archivedAt) {
          <p class="archived" role="status">The library record is archived: it still resolves here, but the pickers no longer offer it.</p>
        }
        @if (newer(); as current) {
          <div class="newer" role="status">
            Library version {{ current.version }} is available ({{ current.changeNote || 'no note' }}).
            <button matButton="tonal" type="button" class="update" (click)="update()">Update to version {{ current.version }}</button>
          </div>
        }
        <ul class="fields">
          @for (state of states(); track state.field) {
            <li [class]="'state-' + state.status" [attr.data-field]="state.field">
              <span class="label">{{ labels[state.field] }}</span>
              <span class="value">{{ show(state.eventValue) }}</span>
              @switch (state.status) {
                @case ('linked') {
                  <span class="mark">linked</span>
                }
                @case ('overridden') {
                  <span class="mark">overridden (library {{ show(state.libraryValue) }}): {{ state.reason }}</span>
                  <button matButton type="button" (click)="restore(state.field)">Restore</button>
                }
                @case ('unexplained') {
                  <span class="mark" role="alert">differs from the library ({{ show(state.libraryValue) }}): give a reason or restore</span>
                  <mat-form-field class="reason">
                    <mat-label>Reason for the override</mat-label>
                    <input matInput [value]="reasons()[state.field] ?? ''" (input)="setReason(state.field, $any($event.target).value)" />
                  </mat-form-field>
                  <button matButton="tonal" type="button" class="keep" (click)="keep(state.field, state.eventValue)">Keep as override</button>
                  <button matButton type="button" (click)="restore(state.field)">Restore</button>
                }
              }
            </li>
          }
        </ul>
        @if (problem(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
        <div class="actions">
          <button matButton type="button" (click)="pick()">Pick another device</button>
          <button matButton type="button" (click)="unlink()">Unlink</button>
        </div>
      } @else {
        <button matButton="tonal" type="button" class="pick" (click)="pick()"><mat-icon>inventory_2</mat-icon> Pick from the library</button>
      }
    </section>
  `,
  styles: `
    .head,
    .newer,
    .actions {
      display: flex;
      align-items: center;
      gap: 8px;
      flex-wrap: wrap;
    }
    .fields {
      list-style: none;
      padding: 0;
      margin: 8px 0;
    }
    .fields li {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
      padding: 2px 0;
    }
    .label {
      min-width: 9em;
    }
    .mark {
      color: var(--mat-sys-on-surface-variant);
    }
    .archived {
      margin: 4px 0;
      color: var(--mat-sys-on-surface-variant);
    }
    .state-overridden .mark {
      color: var(--mat-sys-tertiary);
    }
    .state-unexplained .mark,
    .problem {
      color: var(--mat-sys-error);
    }
    .reason {
      flex: 1 1 220px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceLinkPanel {
  private readonly library = inject(DeviceLibrary);
  private readonly dialog = inject(MatDialog);
  private readonly errorHandler = inject(ErrorHandler);

  readonly event = input.required<RateEvent>();
  readonly eventChange = output<RateEvent>();

  protected readonly labels = LINKED_FIELD_LABELS;
  /** The version the event links to, and the record's current version. */
  protected readonly linked = signal<DeviceVersion | null>(null);
  protected readonly current = signal<DeviceSummary | null>(null);
  protected readonly reasons = signal<Partial<Record<LinkedEventField, string>>>({});
  protected readonly problem = signal<string | null>(null);

  protected readonly states = computed(() => {
    const version = this.linked();
    return version ? linkedFieldStates(this.event(), version) : [];
  });
  protected readonly newer = computed(() => {
    const current = this.current();
    return current && newerVersionAvailable(this.event().device, current) ? current : null;
  });

  constructor() {
    effect(() => {
      const link = this.event().device;
      void this.loadLink(link?.id ?? null, link?.version ?? null);
    });
  }

  protected show(value: number | string | undefined): string {
    if (value === undefined) return '–';
    return typeof value === 'number' ? formatTyped(value) : value;
  }

  protected setReason(field: LinkedEventField, reason: string): void {
    this.reasons.update((reasons) => ({ ...reasons, [field]: reason }));
  }

  protected keep(field: LinkedEventField, value: number | string | undefined): void {
    if (value === undefined) return;
    const change = overrideField(this.event(), field, value as number, this.reasons()[field] ?? '');
    if (!change.ok) {
      this.problem.set(change.message);
      return;
    }
    this.problem.set(null);
    this.eventChange.emit(change.event);
  }

  protected restore(field: LinkedEventField): void {
    const version = this.linked();
    if (version) this.eventChange.emit(restoreField(this.event(), field, version));
  }

  protected update(): void {
    const current = this.current();
    if (current) this.eventChange.emit(updateLink(this.event(), current));
  }

  protected unlink(): void {
    this.eventChange.emit(unlinkEvent(this.event()));
  }

  protected pick(): void {
    const data: DevicePickerDialogData = { linkedId: this.event().device?.id ?? null };
    this.dialog
      .open<DevicePickerDialog, DevicePickerDialogData, DeviceSummary>(DevicePickerDialog, { data, width: '720px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((picked) => {
        if (picked) this.eventChange.emit(linkEvent(this.event(), picked));
      });
  }

  private async loadLink(deviceId: string | null, version: number | null): Promise<void> {
    if (deviceId === null || version === null) {
      this.linked.set(null);
      this.current.set(null);
      return;
    }
    if (this.linked()?.deviceId === deviceId && this.linked()?.version === version) return;
    try {
      const [linked, current] = await Promise.all([this.library.version(deviceId, version), this.library.get(deviceId)]);
      this.linked.set(linked);
      this.current.set(current);
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}

import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import type { DeviceSummary } from '../../../shared/api/devices.js';
import type { EditableModel } from '../canvas/model-graph';
import { LINKED_FIELD_LABELS } from './device-link';
import { DeviceLibrary } from './device-library';
import { linkedDeviceIds, outdatedEvents, updateOutdated, type OutdatedEvent } from './outdated-links';

/**
 * On the canvas: the events that link to an older library version than the record's current one, with
 * an update for each and one for all. An update keeps every override (value and reason), and the notice
 * says which fields keep them. The current versions are read again whenever the set of linked records
 * changes.
 */
@Component({
  selector: 'pl-outdated-devices-notice',
  imports: [MatButton, MatIcon],
  template: `
    @if (outdated().length > 0) {
      <section class="notice" role="status" aria-label="Newer library versions" data-outdated-devices>
        <div class="head">
          <mat-icon aria-hidden="true">update</mat-icon>
          <span>{{ outdated().length === 1 ? '1 event links' : outdated().length + ' events link' }} to an older version of its library record.</span>
          @if (!readOnly()) {
            <button matButton="tonal" type="button" class="update-all" (click)="updateAll()">Update all</button>
          }
        </div>
        <ul>
          @for (item of outdated(); track item.eventId) {
            <li [attr.data-event]="item.eventId">
              <span>
                <strong>{{ item.eventId }}</strong>@if (item.label) { ({{ item.label }}) }: {{ item.current.maker }} {{ item.current.model }}
                v{{ item.linkedVersion }} → v{{ item.current.version }}@if (item.current.changeNote) { · {{ item.current.changeNote }} }
                @if (item.current.archivedAt) { · the record is archived }
              </span>
              @if (item.overriddenFields.length > 0) {
                <span class="kept">overrides kept: {{ fieldNames(item) }}</span>
              }
              @if (!readOnly()) {
                <button matButton type="button" class="update-one" [attr.aria-label]="'Update ' + item.eventId + ' to version ' + item.current.version" (click)="updateOne(item.eventId)">Update</button>
              }
            </li>
          }
        </ul>
      </section>
    }
  `,
  styles: `
    .notice {
      max-height: 160px;
      overflow: auto;
      font: var(--mat-sys-body-small);
      margin: 4px 8px;
      padding: 6px 12px;
      border-radius: 8px;
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .head,
    li {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
    }
    ul {
      margin: 4px 0 0;
      padding: 0;
      list-style: none;
    }
    .kept {
      font-style: italic;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutdatedDevicesNotice {
  private readonly library = inject(DeviceLibrary);
  private readonly errorHandler = inject(ErrorHandler);

  readonly model = input.required<EditableModel>();
  readonly readOnly = input(false);
  readonly edit = output<EditableModel>();

  /** The current version of each linked record, as last read. */
  private readonly currents = signal<ReadonlyMap<string, DeviceSummary>>(new Map());
  private readonly linkedIds = computed(() => linkedDeviceIds(this.model()).join(','));
  protected readonly outdated = computed(() => outdatedEvents(this.model(), this.currents()));

  constructor() {
    effect(() => {
      const ids = this.linkedIds();
      untracked(() => void this.load(ids));
    });
  }

  protected fieldNames(item: OutdatedEvent): string {
    return item.overriddenFields.map((field) => LINKED_FIELD_LABELS[field]).join(', ');
  }

  protected updateAll(): void {
    this.edit.emit(updateOutdated(this.model(), this.currents()));
  }

  protected updateOne(eventId: string): void {
    this.edit.emit(updateOutdated(this.model(), this.currents(), [eventId]));
  }

  private async load(ids: string): Promise<void> {
    if (ids === '') {
      this.currents.set(new Map());
      return;
    }
    try {
      const records = await this.library.search({ ids: ids.split(','), archived: 'all' });
      if (this.linkedIds() === ids) this.currents.set(new Map(records.map((record) => [record.id, record])));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}

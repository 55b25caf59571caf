import { ChangeDetectionStrategy, Component, ErrorHandler, inject, input, output, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { DEVICE_CATEGORIES, type DeviceCategory, type DeviceSummary } from '../../../shared/api/devices.js';
import { formatRate } from '../units/units';
import { CATEGORY_LABELS, SOURCE_KIND_LABELS } from './device-labels';
import { DeviceLibrary } from './device-library';

/**
 * Finds a library record and hands its current version to the caller (`picked`), e.g. to link a model
 * event. Searches as the user types; shows the figures that decide the choice.
 */
@Component({
  selector: 'pl-device-picker',
  imports: [MatButton, MatFormField, MatLabel, MatInput, MatSelect, MatOption, MatIcon],
  template: `
    <div class="filters">
      <mat-form-field class="search">
        <mat-label>Search maker, model or description</mat-label>
        <mat-icon matPrefix>search</mat-icon>
        <input matInput type="search" [value]="search()" (input)="setSearch($any($event.target).value)" />
      </mat-form-field>
      <mat-form-field class="category">
        <mat-label>Category</mat-label>
        <mat-select [value]="category()" (valueChange)="setCategory($event)" aria-label="Category">
          <mat-option [value]="null">Any</mat-option>
          @for (option of categories; track option) {
            <mat-option [value]="option">{{ categoryLabels[option] }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
    </div>
    <ul class="results" aria-label="Library records">
      @for (device of results(); track device.id) {
        <li class="result" [class.current]="device.id === linkedId()" [attr.data-device]="device.id">
          <div class="name">
            <strong>{{ device.maker }} {{ device.model }}</strong>
            <span class="muted">v{{ device.version }} · {{ categoryLabels[device.category] }} · type {{ device.architectureType }}</span>
          </div>
          <div class="figures muted">
            λDU {{ rate(device.lambdaDU) }} · λDD {{ rate(device.lambdaDD) }} · SFF {{ percent(device.safeFailureFraction) }} ·
            {{ sourceLabels[device.sourceKind] }}
          </div>
          <button matButton="tonal" type="button" (click)="picked.emit(device)" [attr.aria-label]="'Use ' + device.maker + ' ' + device.model">
            {{ device.id === linkedId() ? 'Linked' : 'Use' }}
          </button>
        </li>
      } @empty {
        <li class="muted">{{ loading() ? 'Searching…' : 'No library record matches.' }}</li>
      }
    </ul>
  `,
  styles: `
    .filters {
      display: flex;
      gap: 12px;
      flex-wrap: wrap;
    }
    .search {
      flex: 1;
      min-width: 220px;
    }
    .results {
      list-style: none;
      margin: 0;
      padding: 0;
      max-height: 50vh;
      overflow: auto;
    }
    .result {
      display: grid;
      grid-template-columns: 1fr auto;
      gap: 2px 12px;
      padding: 8px 0;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    .result button {
      grid-row: 1 / span 2;
      grid-column: 2;
      align-self: center;
    }
    .name {
      display: flex;
      gap: 8px;
      flex-wrap: wrap;
      align-items: baseline;
    }
    .current {
      background: var(--mat-sys-secondary-container);
    }
    .muted {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DevicePicker {
  private readonly library = inject(DeviceLibrary);
  private readonly errorHandler = inject(ErrorHandler);

  /** The record the event links to now, marked in the list. */
  readonly linkedId = input<string | null>(null);
  readonly picked = output<DeviceSummary>();

  protected readonly categories = DEVICE_CATEGORIES;
  protected readonly categoryLabels = CATEGORY_LABELS;
  protected readonly sourceLabels = SOURCE_KIND_LABELS;
  protected readonly search = signal('');
  protected readonly category = signal<DeviceCategory | null>(null);
  protected readonly results = signal<readonly DeviceSummary[]>([]);
  protected readonly loading = signal(true);
  private request = 0;

  constructor() {
    void this.refresh();
  }

  protected setSearch(text: string): void {
    this.search.set(text);
    void this.refresh();
  }

  protected setCategory(category: DeviceCategory | null): void {
    this.category.set(category);
    void this.refresh();
  }

  protected rate(perHour: number): string {
    return formatRate(perHour);
  }

  protected percent(fraction: number | null): string {
    return fraction === null ? '–' : `${(fraction * 100).toFixed(1)} %`;
  }

  private async refresh(): Promise<void> {
    const mine = ++this.request;
    this.loading.set(true);
    try {
      const found = await this.library.search({ search: this.search(), category: this.category() });
      // Only the answer to the latest search is shown: typing fast sends several.
      if (mine === this.request) this.results.set(found);
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      if (mine === this.request) this.loading.set(false);
    }
  }
}

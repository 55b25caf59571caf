import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import { DEVICE_CATEGORIES, type DEVICE_ARCHIVE_FILTERS, type DeviceCategory } from '../../../shared/api/devices.js';
import { RATE_UNIT_LABELS, RATE_UNITS, formatTyped, rateFromPerHour, type RateUnit } from '../units/units';
import { CATEGORY_LABELS, SOURCE_KIND_LABELS } from './device-labels';
import { DeviceLibrary } from './device-library';

/** The library page: every record's current version, searchable, with import, export and new record. */
@Component({
  selector: 'pl-device-library-page',
  imports: [RouterLink, MatButton, MatFormField, MatLabel, MatInput, MatSelect, MatOption, MatIcon],
  templateUrl: './device-library-page.html',
  styleUrl: './device-library-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceLibraryPage {
  protected readonly library = inject(DeviceLibrary);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly categories = DEVICE_CATEGORIES;
  protected readonly categoryLabels = CATEGORY_LABELS;
  protected readonly sourceLabels = SOURCE_KIND_LABELS;
  protected readonly units = RATE_UNITS;
  protected readonly unitLabels = RATE_UNIT_LABELS;
  protected readonly search = signal('');
  protected readonly category = signal<DeviceCategory | null>(null);
  protected readonly unit = signal<RateUnit>('fit');
  protected readonly archived = signal<(typeof DEVICE_ARCHIVE_FILTERS)[number]>('active');
  protected readonly loaded = signal(false);

  constructor() {
    void this.library.loadAccess().catch((error: unknown) => this.errorHandler.handleError(error));
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

  protected setArchived(filter: (typeof DEVICE_ARCHIVE_FILTERS)[number]): void {
    this.archived.set(filter);
    void this.refresh();
  }

  protected rate(perHour: number): string {
    return formatTyped(rateFromPerHour(perHour, this.unit()));
  }

  protected percent(fraction: number | null): string {
    return fraction === null ? '–' : `${(fraction * 100).toFixed(1)} %`;
  }

  private async refresh(): Promise<void> {
    try {
      await this.library.load({ search: this.search(), category: this.category(), archived: this.archived() });
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.loaded.set(true);
    }
  }
}

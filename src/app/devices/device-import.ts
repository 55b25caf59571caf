import { ChangeDetectionStrategy, Component, ErrorHandler, computed, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import {
  IMPORT_FIELDS,
  IMPORT_RATE_UNITS,
  type ImportField,
  type ImportMapping,
  type ImportPreview,
  type ImportRateUnit,
  type ImportResult,
} from '../../../shared/api/devices.js';
import { isApiError } from '../errors/api-error';
import { DeviceLibrary } from './device-library';
import { IMPORT_FIELD_LABELS, OUTCOME_LABELS, RATE_UNIT_LABELS } from './device-labels';

/** Columns of the preview table besides line, outcome and errors. */
const PREVIEW_FIELDS: readonly ImportField[] = ['maker', 'model', 'category', 'lambdaDU', 'lambdaDD', 'lambdaSU', 'lambdaSD', 'architectureType', 'sourceKind'];

/**
 * CSV import into the library: the file is read in the browser and sent for a preview (nothing written),
 * the user maps columns, picks the rate unit and sees every row's outcome and errors; only "Import"
 * writes, in one transaction on the server.
 */
@Component({
  selector: 'pl-device-import',
  imports: [FormsModule, RouterLink, MatButton, MatCheckbox, MatFormField, MatLabel, MatInput, MatSelect, MatOption, MatIcon],
  templateUrl: './device-import.html',
  styleUrl: './device-import.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceImport {
  private readonly library = inject(DeviceLibrary);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly fields = IMPORT_FIELDS;
  protected readonly previewFields = PREVIEW_FIELDS;
  protected readonly fieldLabels = IMPORT_FIELD_LABELS;
  protected readonly outcomeLabels = OUTCOME_LABELS;
  protected readonly units = IMPORT_RATE_UNITS;
  protected readonly unitLabels = RATE_UNIT_LABELS;

  protected readonly csv = signal('');
  protected readonly fileName = signal<string | null>(null);
  protected readonly rateUnit = signal<ImportRateUnit>('perHour');
  protected readonly mapping = signal<ImportMapping>({});
  protected readonly preview = signal<ImportPreview | null>(null);
  protected readonly skipInvalidRows = signal(false);
  protected readonly updateExisting = signal(true);
  protected readonly busy = signal(false);
  protected readonly result = signal<ImportResult | null>(null);
  protected readonly problem = signal<string | null>(null);

  protected readonly writableCount = computed(() => {
    const counts = this.preview()?.counts;
    if (!counts) return 0;
    return counts.new + (this.updateExisting() ? counts['new-version'] : 0);
  });

  /** Why Import is disabled, or null when it may run. */
  protected readonly blockedBecause = computed(() => {
    const preview = this.preview();
    if (!preview) return 'Preview the file first.';
    if (preview.fileErrors.length > 0) return 'Fix the problems of the file first.';
    if (preview.counts.invalid > 0 && !this.skipInvalidRows()) return `${preview.counts.invalid} rows have errors: fix them, or skip them.`;
    if (this.writableCount() === 0) return 'No row would change the library.';
    return null;
  });

  protected async readFile(input: HTMLInputElement): Promise<void> {
    const file = input.files?.[0];
    if (!file) return;
    this.fileName.set(file.name);
    this.setCsv(await file.text());
  }

  protected setCsv(text: string): void {
    this.csv.set(text);
    this.preview.set(null);
    this.result.set(null);
  }

  protected setUnit(unit: ImportRateUnit): void {
    this.rateUnit.set(unit);
    if (this.preview()) void this.runPreview();
  }

  protected setMapping(field: ImportField, header: string | null): void {
    this.mapping.update((mapping) => {
      const next = { ...mapping };
      if (header === null) delete next[field];
      else next[field] = header;
      return next;
    });
    if (this.preview()) void this.runPreview();
  }

  /** The header a field is read from in the last preview (also when taken by name, not mapped). */
  protected mappedHeader(field: ImportField): string | null {
    return this.mapping()[field] ?? this.preview()?.mapping[field] ?? null;
  }

  protected labelOf(path: string): string {
    return (IMPORT_FIELDS as readonly string[]).includes(path) ? IMPORT_FIELD_LABELS[path as ImportField] : path;
  }

  protected errorFor(row: ImportPreview['rows'][number], field: ImportField): string | null {
    return row.errors.find((error) => error.path === field)?.message ?? null;
  }

  protected async runPreview(): Promise<void> {
    if (this.csv().trim() === '') {
      this.problem.set('Choose a CSV file or paste its text first.');
      return;
    }
    this.problem.set(null);
    this.busy.set(true);
    try {
      this.preview.set(await this.library.previewImport({ csv: this.csv(), mapping: this.mapping(), rateUnit: this.rateUnit() }));
    } catch (error) {
      this.report(error);
    } finally {
      this.busy.set(false);
    }
  }

  protected async confirm(): Promise<void> {
    if (this.blockedBecause() !== null) return;
    this.busy.set(true);
    try {
      const result = await this.library.confirmImport({
        csv: this.csv(),
        mapping: this.mapping(),
        rateUnit: this.rateUnit(),
        skipInvalidRows: this.skipInvalidRows(),
        existingRecords: this.updateExisting() ? 'new-version' : 'skip',
      });
      this.result.set(result);
      this.preview.set(null);
    } catch (error) {
      this.report(error);
    } finally {
      this.busy.set(false);
    }
  }

  private report(error: unknown): void {
    if (isApiError(error) && error.status < 500 && error.status !== 401) this.problem.set(error.message);
    else this.errorHandler.handleError(error);
  }
}

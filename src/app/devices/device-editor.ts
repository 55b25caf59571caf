import { ChangeDetectionStrategy, Component, ErrorHandler, computed, inject, input, signal, effect } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import {
  ARCHITECTURE_TYPES,
  DEVICE_CATEGORIES,
  DEVICE_SOURCE_KINDS,
  MAX_EVIDENCE_BYTES,
  RATE_FIELDS,
  deviceConflictDetails,
  derivedFractions,
  type DeviceDetail,
  type DeviceUsageEntry,
  type DeviceVersion,
} from '../../../shared/api/devices.js';
import { LINKED_FIELD_LABELS } from './device-link';
import type { ValidationIssue } from '../../../shared/api/errors.js';
import { isApiError } from '../errors/api-error';
import { RATE_UNIT_LABELS, RATE_UNITS, formatTyped, rateToPerHour, readTypedNumber, type RateUnit } from '../units/units';
import { convertRates, emptyDeviceForm, fromDeviceForm, toDeviceForm, type DeviceFormValue } from './device-form';
import { CATEGORY_LABELS, SOURCE_KIND_LABELS } from './device-labels';
import { DeviceLibrary } from './device-library';

const EVIDENCE_TYPES = '.pdf,.png,.jpg,.jpeg,application/pdf,image/png,image/jpeg';

/**
 * One library record: its figures (rates typed per hour, in FIT or per year), the derived DC and SFF,
 * its versions and its evidence files. Saving an existing record writes a new version with a note.
 */
@Component({
  selector: 'pl-device-editor',
  imports: [RouterLink, MatButton, MatFormField, MatLabel, MatHint, MatInput, MatSelect, MatOption, MatIcon],
  templateUrl: './device-editor.html',
  styleUrl: './device-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceEditor {
  private readonly library = inject(DeviceLibrary);
  private readonly router = inject(Router);
  private readonly errorHandler = inject(ErrorHandler);

  /** From the route: a record id, or absent for a new record. */
  readonly deviceId = input<string>();

  protected readonly categories = DEVICE_CATEGORIES;
  protected readonly categoryLabels = CATEGORY_LABELS;
  protected readonly sourceKinds = DEVICE_SOURCE_KINDS;
  protected readonly sourceLabels = SOURCE_KIND_LABELS;
  protected readonly architectureTypes = ARCHITECTURE_TYPES;
  protected readonly units = RATE_UNITS;
  protected readonly unitLabels = RATE_UNIT_LABELS;
  protected readonly evidenceTypes = EVIDENCE_TYPES;
  protected readonly rateFields = RATE_FIELDS;
  protected readonly rateLabels = { lambdaDU: 'λDU', lambdaDD: 'λDD', lambdaSU: 'λSU', lambdaSD: 'λSD' } as const;
  protected readonly maxEvidenceMegabytes = MAX_EVIDENCE_BYTES / (1024 * 1024);

  protected readonly record = signal<DeviceDetail | null>(null);
  protected readonly versions = signal<readonly DeviceVersion[]>([]);
  protected readonly form = signal<DeviceFormValue>(emptyDeviceForm());
  protected readonly unit = signal<RateUnit>('fit');
  protected readonly changeNote = signal('');
  protected readonly issues = signal<readonly ValidationIssue[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly evidenceDescription = signal('');
  /** The models and events that link to the record (those the user may read); null until loaded. */
  protected readonly usage = signal<readonly DeviceUsageEntry[] | null>(null);
  protected readonly confirmingDelete = signal(false);
  protected readonly archived = computed(() => this.record()?.archivedAt != null);
  /** May archive, restore and delete records. */
  protected readonly canManage = computed(() => this.library.access().canEdit);
  /** May change the figures and evidence: an editor, and the record is not archived. */
  protected readonly canEdit = computed(() => this.library.access().canEdit && !this.archived());

  /** DC and SFF of the figures as typed (IEC 61508-2:2010 Annex C), null while a rate is not a number. */
  protected readonly derived = computed(() => {
    const value = this.form();
    const rates = (['lambdaDU', 'lambdaDD', 'lambdaSU', 'lambdaSD'] as const).map((field) => readTypedNumber(value[field]));
    if (rates.some((rate) => rate === null || Number.isNaN(rate))) return null;
    const [lambdaDU, lambdaDD, lambdaSU, lambdaSD] = rates.map((rate) => rateToPerHour(rate as number, this.unit()));
    return derivedFractions({ lambdaDU: lambdaDU!, lambdaDD: lambdaDD!, lambdaSU: lambdaSU!, lambdaSD: lambdaSD! });
  });

  constructor() {
    void this.library.loadAccess().catch((error: unknown) => this.errorHandler.handleError(error));
    effect(() => {
      const id = this.deviceId();
      if (id) void this.load(id);
    });
  }

  protected set(field: keyof DeviceFormValue, value: string): void {
    this.form.update((form) => ({ ...form, [field]: value }));
    this.issues.update((issues) => issues.filter((issue) => issue.path !== field));
  }

  protected setChangeNote(text: string): void {
    this.changeNote.set(text);
    this.issues.update((issues) => issues.filter((issue) => issue.path !== 'changeNote'));
  }

  protected setUnit(unit: RateUnit): void {
    this.form.update((form) => convertRates(form, this.unit(), unit));
    this.unit.set(unit);
  }

  protected issueFor(field: string): string | null {
    return this.issues().find((issue) => issue.path === field)?.message ?? null;
  }

  protected percent(fraction: number | null | undefined): string {
    return fraction === null || fraction === undefined ? '–' : `${(fraction * 100).toFixed(1)} %`;
  }

  protected perHour(rate: number): string {
    return `${formatTyped(rate)} /h`;
  }

  protected async save(): Promise<void> {
    const result = fromDeviceForm(this.form(), this.unit());
    const current = this.record();
    const issues = result.ok ? [] : [...result.issues];
    if (current && this.changeNote().trim() === '') issues.push({ path: 'changeNote', message: 'say what changed and why (kept with the new version)' });
    this.issues.set(issues);
    if (!result.ok || issues.length > 0) {
      this.problem.set('Some fields need attention; nothing was saved.');
      return;
    }
    this.problem.set(null);
    this.busy.set(true);
    try {
      if (current) {
        const saved = await this.library.update(current.id, { ...result.fields, basedOnVersion: current.version, changeNote: this.changeNote() });
        this.record.set(saved);
        this.changeNote.set('');
        this.versions.set(await this.library.versions(saved.id));
      } else {
        const created = await this.library.create({ ...result.fields, changeNote: this.changeNote() });
        await this.router.navigate(['/devices', created.id]);
      }
    } catch (error) {
      this.handleSaveError(error);
    } finally {
      this.busy.set(false);
    }
  }

  protected async upload(input: HTMLInputElement): Promise<void> {
    const file = input.files?.[0];
    const current = this.record();
    if (!file || !current) return;
    if (file.size > MAX_EVIDENCE_BYTES) {
      this.problem.set(`${file.name} is larger than ${this.maxEvidenceMegabytes} MB.`);
      input.value = '';
      return;
    }
    this.busy.set(true);
    try {
      this.record.set(await this.library.uploadEvidence(current.id, file, this.evidenceDescription()));
      this.evidenceDescription.set('');
      this.problem.set(null);
    } catch (error) {
      if (isApiError(error) && error.status >= 400 && error.status < 500 && error.status !== 401) this.problem.set(error.message);
      else this.errorHandler.handleError(error);
    } finally {
      input.value = '';
      this.busy.set(false);
    }
  }

  protected async removeEvidence(evidenceId: string): Promise<void> {
    const current = this.record();
    if (!current) return;
    try {
      await this.library.removeEvidence(current.id, evidenceId);
      this.record.set(await this.library.get(current.id));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  protected async archive(): Promise<void> {
    await this.change((id) => this.library.archive(id));
  }

  protected async restore(): Promise<void> {
    await this.change((id) => this.library.restore(id));
  }

  protected async remove(): Promise<void> {
    const current = this.record();
    if (!current) return;
    this.confirmingDelete.set(false);
    this.busy.set(true);
    try {
      await this.library.remove(current.id);
      await this.router.navigate(['/devices']);
    } catch (error) {
      this.showRefusal(error);
    } finally {
      this.busy.set(false);
    }
  }

  /** "Draft v3" or "Rev 2". */
  protected placeText(entry: DeviceUsageEntry): string {
    return entry.place === 'draft' ? `Draft v${entry.placeNumber}` : `Rev ${entry.placeNumber}`;
  }

  protected overridesText(entry: DeviceUsageEntry): string {
    return entry.overriddenFields.map((field) => LINKED_FIELD_LABELS[field as keyof typeof LINKED_FIELD_LABELS] ?? field).join(', ');
  }

  private async change(action: (deviceId: string) => Promise<DeviceDetail>): Promise<void> {
    const current = this.record();
    if (!current) return;
    this.busy.set(true);
    try {
      this.record.set(await action(current.id));
      this.problem.set(null);
    } catch (error) {
      this.showRefusal(error);
    } finally {
      this.busy.set(false);
    }
  }

  /** A refusal the user can act on (403, 404, 409) is shown with the server's words; others go to the handler. */
  private showRefusal(error: unknown): void {
    if (isApiError(error) && error.status >= 400 && error.status < 500 && error.status !== 401) this.problem.set(error.message);
    else this.errorHandler.handleError(error);
  }

  protected evidenceUrl(evidenceId: string): string {
    return this.library.evidenceUrl(this.record()?.id ?? '', evidenceId);
  }

  private async load(deviceId: string): Promise<void> {
    try {
      const [record, versions, usage] = await Promise.all([this.library.get(deviceId), this.library.versions(deviceId), this.library.usage(deviceId)]);
      this.record.set(record);
      this.versions.set(versions);
      this.usage.set(usage.entries);
      this.form.set(toDeviceForm(record, this.unit()));
    } catch (error) {
      if (isApiError(error, 404)) this.problem.set('There is no such library record, or you may not see it.');
      else this.errorHandler.handleError(error);
    }
  }

  private handleSaveError(error: unknown): void {
    if (isApiError(error, 409) && error.code === 'version_conflict') {
      const details = deviceConflictDetails.safeParse(error.details);
      if (details.success) {
        // The user's figures stay in the form; the record underneath moves to the newer version.
        this.record.set(details.data.current);
        void this.library.versions(details.data.current.id).then((versions) => this.versions.set(versions));
      }
      this.problem.set(`${error.message}. Your figures are still in the form; check them against the newer version below and save again.`);
    } else if (isApiError(error) && error.status >= 400 && error.status < 500 && error.status !== 401) {
      this.issues.set(error.issues);
      this.problem.set(error.message);
    } else {
      this.errorHandler.handleError(error);
    }
  }
}

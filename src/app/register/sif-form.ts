import type { AbstractControl, FormControl, FormGroup, NonNullableFormBuilder, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { z } from 'zod';
import {
  checkDemandRate,
  deriveSifTarget,
  sifTarget,
  type SifDemandMode,
  type SifTargetCheck,
  type SifTargetKind,
} from '../../../shared/api/sif-target.js';
import {
  createSifBody,
  demandRatePerYear,
  missionHours,
  sifTag,
  type CreateSifBody,
  type Sif,
  type SifStatus,
  type UpdateSifBody,
} from '../../../shared/api/sifs.js';
import { schemaValidator } from '../forms/schema-validator';

/**
 * The SIF form keeps numbers as the text the user typed ("2e-3" stays "2e-3"), so nothing typed is
 * altered or lost; the text is read as a number when it is checked and saved.
 */
export interface SifFormValue {
  tag: string;
  title: string;
  hazardousEvent: string;
  demandMode: SifDemandMode;
  targetKind: SifTargetKind;
  targetValue: string;
  demandRatePerYear: string;
  missionHours: string;
  status: SifStatus;
}

export type SifForm = FormGroup<{ [Key in keyof SifFormValue]: FormControl<SifFormValue[Key]> }>;

/** The fields that make up a SIF's content (everything but its status). */
export const CONTENT_FIELDS = [
  'tag',
  'title',
  'hazardousEvent',
  'demandMode',
  'targetKind',
  'targetValue',
  'demandRatePerYear',
  'missionHours',
] as const satisfies readonly (keyof SifFormValue)[];

export const FIELD_LABELS: Record<keyof SifFormValue, string> = {
  tag: 'Tag',
  title: 'Title',
  hazardousEvent: 'Hazardous event',
  demandMode: 'Demand mode',
  targetKind: 'Target given as',
  targetValue: 'Target value',
  demandRatePerYear: 'Demand rate',
  missionHours: 'Mission time',
  status: 'Status',
};

export const EMPTY_SIF_FORM: SifFormValue = {
  tag: '',
  title: '',
  hazardousEvent: '',
  demandMode: 'low',
  targetKind: 'sil',
  targetValue: '',
  demandRatePerYear: '',
  missionHours: '',
  status: 'draft',
};

/** Reads typed text as a number: null for blank, NaN for anything that is not one number. */
export function readNumber(text: string): number | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  return /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(trimmed) ? Number(trimmed) : Number.NaN;
}

const NOT_A_NUMBER = 'must be a number, e.g. 0.002 or 2e-3';

/** Validator of a number typed as text, against a shared zod schema of the number. */
function numberText(schema: z.ZodType, required: boolean): ValidatorFn {
  return (control: AbstractControl<string>): ValidationErrors | null => {
    const value = readNumber(control.value);
    if (value === null) return required ? { schema: 'must be given' } : null;
    if (Number.isNaN(value)) return { schema: NOT_A_NUMBER };
    const result = schema.safeParse(value);
    return result.success ? null : { schema: result.error.issues[0]?.message ?? 'is not valid' };
  };
}

/** The target as the form holds it, checked for the form's demand mode with the shared derivation. */
export function checkFormTarget(value: Pick<SifFormValue, 'demandMode' | 'targetKind' | 'targetValue'>): SifTargetCheck {
  return deriveSifTarget({ kind: value.targetKind, value: readNumber(value.targetValue) ?? Number.NaN }, value.demandMode);
}

function siblings(control: AbstractControl): Partial<SifFormValue> | null {
  const group = control.parent;
  return group ? (group.getRawValue() as Partial<SifFormValue>) : null;
}

const targetKindValidator: ValidatorFn = (control) => {
  const form = siblings(control);
  if (!form?.demandMode) return null;
  const check = checkFormTarget({ demandMode: form.demandMode, targetKind: control.value, targetValue: form.targetValue ?? '' });
  return !check.ok && check.issue.path === 'target.kind' ? { schema: check.issue.message } : null;
};

const targetValueValidator: ValidatorFn = (control) => {
  const value = readNumber(control.value);
  if (value === null) return { schema: 'must be given' };
  if (Number.isNaN(value)) return { schema: NOT_A_NUMBER };
  const shape = sifTarget.shape.value.safeParse(value);
  if (!shape.success) return { schema: shape.error.issues[0]?.message ?? 'is not valid' };
  const form = siblings(control);
  if (!form?.demandMode || !form.targetKind) return null;
  const check = checkFormTarget({ demandMode: form.demandMode, targetKind: form.targetKind, targetValue: control.value });
  return !check.ok && check.issue.path === 'target.value' ? { schema: check.issue.message } : null;
};

const demandRateSchemaValidator = numberText(demandRatePerYear, false);
const demandRateValidator: ValidatorFn = (control) => {
  const shapeError = demandRateSchemaValidator(control);
  if (shapeError) return shapeError;
  const form = siblings(control);
  if (!form?.demandMode) return null;
  const issue = checkDemandRate(form.demandMode, readNumber(control.value));
  return issue ? { schema: issue.message } : null;
};

export function buildSifForm(formBuilder: NonNullableFormBuilder): SifForm {
  const form: SifForm = formBuilder.group({
    tag: [EMPTY_SIF_FORM.tag, schemaValidator(sifTag)],
    title: [EMPTY_SIF_FORM.title, schemaValidator(createSifBody.shape.title)],
    hazardousEvent: [EMPTY_SIF_FORM.hazardousEvent, schemaValidator(createSifBody.shape.hazardousEvent)],
    demandMode: [EMPTY_SIF_FORM.demandMode],
    targetKind: [EMPTY_SIF_FORM.targetKind, targetKindValidator],
    targetValue: [EMPTY_SIF_FORM.targetValue, targetValueValidator],
    demandRatePerYear: [EMPTY_SIF_FORM.demandRatePerYear, demandRateValidator],
    missionHours: [EMPTY_SIF_FORM.missionHours, numberText(missionHours, true)],
    status: [EMPTY_SIF_FORM.status],
  });
  // The target and the demand rate are judged against the demand mode (and the value against its kind),
  // so each is checked again when the field it depends on changes.
  const { demandMode, targetKind, targetValue, demandRatePerYear: demandRate } = form.controls;
  demandMode.valueChanges.subscribe(() => {
    targetKind.updateValueAndValidity({ emitEvent: false });
    targetValue.updateValueAndValidity({ emitEvent: false });
    demandRate.updateValueAndValidity({ emitEvent: false });
  });
  targetKind.valueChanges.subscribe(() => targetValue.updateValueAndValidity({ emitEvent: false }));
  targetValue.valueChanges.subscribe(() => targetKind.updateValueAndValidity({ emitEvent: false }));
  // The validators that read sibling fields had no parent when first run.
  for (const control of Object.values(form.controls)) control.updateValueAndValidity({ emitEvent: false });
  return form;
}

/** The form's view of a stored record. */
export function formValueOf(record: Sif): SifFormValue {
  return {
    tag: record.tag,
    title: record.title,
    hazardousEvent: record.hazardousEvent,
    demandMode: record.demandMode,
    targetKind: record.target.kind,
    targetValue: String(record.target.value),
    demandRatePerYear: record.demandRatePerYear === null ? '' : String(record.demandRatePerYear),
    missionHours: String(record.missionHours),
    status: record.status,
  };
}

const NUMBER_FIELDS: readonly (keyof SifFormValue)[] = ['targetValue', 'demandRatePerYear', 'missionHours'];

/** Whether two form values of a field mean the same ("0.002" and "2e-3" do). */
function sameFieldValue(field: keyof SifFormValue, a: string, b: string): boolean {
  if (NUMBER_FIELDS.includes(field)) {
    const left = readNumber(a);
    const right = readNumber(b);
    if (left === null || right === null) return left === right;
    if (Number.isNaN(left) || Number.isNaN(right)) return a.trim() === b.trim();
    return left === right;
  }
  return a.trim() === b.trim();
}

/** The fields where two form values differ. */
export function differingFields(mine: SifFormValue, theirs: SifFormValue): (keyof SifFormValue)[] {
  return (Object.keys(FIELD_LABELS) as (keyof SifFormValue)[]).filter((field) => !sameFieldValue(field, mine[field], theirs[field]));
}

export function createBodyOf(value: SifFormValue): CreateSifBody {
  return {
    tag: value.tag,
    title: value.title,
    hazardousEvent: value.hazardousEvent,
    demandMode: value.demandMode,
    target: { kind: value.targetKind, value: readNumber(value.targetValue) ?? Number.NaN },
    demandRatePerYear: readNumber(value.demandRatePerYear),
    missionHours: readNumber(value.missionHours) ?? Number.NaN,
  };
}

/**
 * The PATCH that turns `base` into what the form holds: only the fields that differ, and the version of
 * `base` the change is built on. Null when nothing differs.
 */
export function updateBodyOf(value: SifFormValue, base: Sif): UpdateSifBody | null {
  const changed = differingFields(value, formValueOf(base));
  if (changed.length === 0) return null;
  const full = createBodyOf(value);
  const body: UpdateSifBody = { version: base.version };
  for (const field of changed) {
    switch (field) {
      case 'targetKind':
      case 'targetValue':
        body.target = full.target;
        break;
      case 'status':
        body.status = value.status;
        break;
      case 'demandRatePerYear':
        body.demandRatePerYear = full.demandRatePerYear ?? null;
        break;
      case 'tag':
        body.tag = full.tag;
        break;
      case 'title':
        body.title = full.title;
        break;
      case 'hazardousEvent':
        body.hazardousEvent = full.hazardousEvent;
        break;
      case 'demandMode':
        body.demandMode = full.demandMode;
        break;
      case 'missionHours':
        body.missionHours = full.missionHours;
        break;
    }
  }
  return body;
}

/** The form control that shows an API issue path ("target.value" -> targetValue). */
export function controlForIssue(form: SifForm, path: string): AbstractControl | null {
  switch (path) {
    case 'target':
    case 'target.value':
      return form.controls.targetValue;
    case 'target.kind':
      return form.controls.targetKind;
    default:
      return (form.controls as Record<string, AbstractControl>)[path] ?? null;
  }
}

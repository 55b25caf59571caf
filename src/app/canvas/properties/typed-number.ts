import { signal, type DestroyRef, type WritableSignal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import type { Observable } from 'rxjs';
import { FormControl, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { formatTyped, readTypedNumber } from '../../units/units';

export interface NumberRule {
  readonly required?: boolean;
  readonly min?: number;
  /** The lower bound itself is not allowed (an interval must be above 0). */
  readonly exclusiveMin?: boolean;
  readonly max?: number;
  readonly integer?: boolean;
}

/** Validates a typed number (scientific notation and a decimal comma allowed) against a rule. */
export function typedNumber(rule: NumberRule): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value = readTypedNumber(String(control.value ?? ''));
    if (value === null) return rule.required ? { required: true } : null;
    if (Number.isNaN(value) || !Number.isFinite(value)) return { notANumber: true };
    if (rule.integer && !Number.isInteger(value)) return { integer: true };
    if (rule.min !== undefined && (rule.exclusiveMin ? value <= rule.min : value < rule.min)) return { min: { min: rule.min, exclusive: rule.exclusiveMin ?? false } };
    if (rule.max !== undefined && value > rule.max) return { max: { max: rule.max } };
    return null;
  };
}

/** A text control for a number, with its rule. */
export function numberControl(value: number | undefined, rule: NumberRule): FormControl<string> {
  return new FormControl(value === undefined ? '' : formatTyped(value), { nonNullable: true, validators: typedNumber(rule) });
}

/** The message shown under a field: what is wrong, in words, naming the field. */
export function numberMessage(label: string, control: AbstractControl): string {
  const errors = control.errors;
  if (!errors) return '';
  if (errors['required']) return `${label} is required.`;
  if (errors['notANumber']) return `${label} must be a number, e.g. 2.5e-7.`;
  if (errors['integer']) return `${label} must be a whole number.`;
  if (errors['min']) {
    const { min, exclusive } = errors['min'] as { min: number; exclusive: boolean };
    return exclusive ? `${label} must be more than ${min}.` : `${label} must be ${min} or more.`;
  }
  if (errors['max']) return `${label} must be ${(errors['max'] as { max: number }).max} or less.`;
  if (errors['pattern']) return `${label}: 1-64 letters, digits, "_", "." or "-", starting with a letter or digit.`;
  if (errors['taken']) return `${label} "${control.value}" is already used in this model.`;
  return `${label} is not valid.`;
}

/** The value of a valid number control (null when empty). */
export function readControl(control: AbstractControl<string>): number | null {
  return readTypedNumber(control.value);
}

/** Model item ids, as shared/model-file.ts allows them. */
export const ITEM_ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.\-]{0,63}$/;

/** Refuses an id another item of the model already has. */
export function uniqueId(taken: () => ReadonlySet<string>, own: () => string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    // An empty id (the form being built, before the inputs arrive) is the required validator's business.
    const value = String(control.value ?? '');
    if (value === '') return null;
    return value !== own() && taken().has(value) ? { taken: true } : null;
  };
}

/**
 * A form's raw value as a signal. It follows the form's value changes; after a programmatic patch made
 * without events (loading the selected item), the caller sets it again from `getRawValue()`.
 */
export function formValueSignal<T>(form: { getRawValue(): T; valueChanges: Observable<unknown> }, destroyRef: DestroyRef): WritableSignal<T> {
  const value = signal(form.getRawValue());
  form.valueChanges.pipe(takeUntilDestroyed(destroyRef)).subscribe(() => value.set(form.getRawValue()));
  return value;
}

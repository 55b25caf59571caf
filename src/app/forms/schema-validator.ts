import type { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { z } from 'zod';

/**
 * A form validator built from a field of a shared zod schema, so the form says exactly what the server
 * would: the error is `{ schema: "<message>" }`, e.g. "must not be empty".
 */
export function schemaValidator(schema: z.ZodType): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const result = schema.safeParse(control.value);
    return result.success ? null : { schema: result.error.issues[0]?.message ?? 'is not valid' };
  };
}

/** The message to show under a field: the schema's, or the server's from a refused save. */
export function fieldMessage(control: AbstractControl): string {
  const errors = control.errors;
  if (!errors) return '';
  const message = errors['schema'] ?? errors['server'] ?? errors['mismatch'];
  return typeof message === 'string' ? message : 'is not valid';
}

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

/**
 * The sentence to show under a field: the schema's message, or the server's from a refused save. Messages
 * that complete a sentence ("must not be empty") get the field's name in front; messages that are
 * sentences of their own ("a PFH target does not apply in low demand mode") are shown as they are.
 */
export function fieldMessage(subject: string, control: AbstractControl): string {
  const errors = control.errors;
  if (!errors) return '';
  const found = errors['schema'] ?? errors['server'] ?? errors['mismatch'];
  const message = typeof found === 'string' ? found : 'is not valid';
  if (/^(must|is|are|has)\b/.test(message)) return `${subject} ${message}`;
  return message.charAt(0).toUpperCase() + message.slice(1);
}

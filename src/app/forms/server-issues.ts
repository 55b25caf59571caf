import type { AbstractControl } from '@angular/forms';
import type { ApiError } from '../errors/api-error';

/**
 * Puts the fields at fault of a refused save (400 validation_failed) on the form's own controls, so each
 * message shows under its field. `controlFor` maps the API's dotted path to a control. Returns whether
 * every issue found its field; the caller shows the rest.
 */
export function showServerIssues(error: ApiError, controlFor: (path: string) => AbstractControl | null): boolean {
  const issues = error.issues;
  let allPlaced = issues.length > 0;
  for (const issue of issues) {
    const control = controlFor(issue.path);
    if (control) {
      control.setErrors({ ...control.errors, server: issue.message });
      control.markAsDirty();
      control.markAsTouched();
    } else {
      allPlaced = false;
    }
  }
  return allPlaced;
}

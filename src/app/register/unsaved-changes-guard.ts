import { inject } from '@angular/core';
import { MatDialog } from '@angular/material/dialog';
import type { CanDeactivateFn } from '@angular/router';
import { confirmWith } from '../shell/confirm-dialog';

export interface HoldsUnsavedChanges {
  hasUnsavedChanges(): boolean;
}

/** Leaving a form with unsaved edits asks first, so nothing typed is lost by a stray click. */
export const unsavedChangesGuard: CanDeactivateFn<HoldsUnsavedChanges> = (component) => {
  if (!component.hasUnsavedChanges()) return true;
  return confirmWith(inject(MatDialog), {
    title: 'Leave without saving?',
    message: 'Your changes to this SIF are not saved. Leave the page and drop them?',
    confirmLabel: 'Leave and drop changes',
  });
};

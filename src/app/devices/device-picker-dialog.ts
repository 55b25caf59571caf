import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import type { DeviceSummary } from '../../../shared/api/devices.js';
import { DevicePicker } from './device-picker';

export interface DevicePickerDialogData {
  readonly linkedId: string | null;
}

/** The picker in a dialog; closes with the chosen record's current version, or nothing on cancel. */
@Component({
  selector: 'pl-device-picker-dialog',
  imports: [DevicePicker, MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Pick a device from the library</h2>
    <mat-dialog-content>
      <pl-device-picker [linkedId]="data.linkedId" (picked)="dialogRef.close($event)" />
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" mat-dialog-close>Cancel</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DevicePickerDialog {
  protected readonly data = inject<DevicePickerDialogData>(MAT_DIALOG_DATA);
  protected readonly dialogRef = inject<MatDialogRef<DevicePickerDialog, DeviceSummary>>(MatDialogRef);
}

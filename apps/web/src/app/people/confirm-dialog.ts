import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';

export interface ConfirmData {
  title: string;
  message: string;
  /** The confirming button; null when the step cannot be taken (the dialog then only explains). */
  confirm: string | null;
}

/** Asks before a consequential change. Closes with true when confirmed. */
@Component({
  selector: 'ny-confirm-dialog',
  imports: [MatButtonModule, MatDialogModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p>{{ data.message }}</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>
        {{ data.confirm ? 'Cancel' : 'Close' }}
      </button>
      @if (data.confirm) {
        <button mat-flat-button type="button" [mat-dialog-close]="true">{{ data.confirm }}</button>
      }
    </mat-dialog-actions>
  `,
})
export class ConfirmDialog {
  protected readonly data = inject<ConfirmData>(MAT_DIALOG_DATA);
}

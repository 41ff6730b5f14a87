import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import type { WhatIfAdoption } from '@nightyard/contracts';

export interface AdoptData {
  adoption: WhatIfAdoption;
  /** "Wednesday, December 9" */
  night: string;
  depot: string;
}

/**
 * Before a what-if is adopted: what differs between the study and the depot as it is now, and what
 * adopting does (a new draft from the depot's data, to review and publish). Closes with true to adopt.
 */
@Component({
  selector: 'ny-adopt-dialog',
  imports: [MatButtonModule, MatDialogModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <h2 mat-dialog-title>Adopt what-if version {{ data.adoption.whatIf.version }}?</h2>
    <mat-dialog-content>
      <p>
        Adopting makes a new draft for the night of {{ data.night }} from {{ data.depot }} as it is now: its chargers in
        service, service limit, rate plan, buses and runs, with the study's choice of
        {{ data.adoption.includesMidday ? 'the night and the midday layover' : 'the night only' }}. The what-if stays a
        study. Review the draft, then publish it.
      </p>
      @if (data.adoption.differences.length) {
        <h3 id="adopt-differences">
          {{
            data.adoption.differences.length === 1 ? '1 difference' : data.adoption.differences.length + ' differences'
          }}
          from the study: the depot's data is used
        </h3>
        <ul class="differences" aria-labelledby="adopt-differences">
          @for (d of data.adoption.differences; track $index) {
            <li>{{ d }}</li>
          }
        </ul>
      } @else {
        <p class="same">The study still matches the depot: nothing differs.</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Cancel</button>
      <button mat-flat-button type="button" [mat-dialog-close]="true">Adopt as a new draft</button>
    </mat-dialog-actions>
  `,
  styles: `
    h3 {
      margin: 16px 0 4px;
      font: var(--mat-sys-title-small);
      color: var(--mat-sys-on-surface);
    }
    .differences {
      margin: 0;
      padding-inline-start: 20px;
    }
    .differences li {
      margin: 2px 0;
    }
    .same {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
})
export class AdoptDialog {
  protected readonly data = inject<AdoptData>(MAT_DIALOG_DATA);
}

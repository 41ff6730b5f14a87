import { DestroyRef, inject } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import type { AbstractControl } from '@angular/forms';
import { MatDialog, MatDialogRef } from '@angular/material/dialog';
import { firstValueFrom } from 'rxjs';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';

/**
 * Esc or a click beside a dialog with edits asks before throwing them away; without edits it
 * closes as before. Call in the dialog's constructor (injection context) with its form.
 */
export function guardDiscard(form: AbstractControl, what = 'your changes'): void {
  const ref = inject(MatDialogRef);
  const dialog = inject(MatDialog);
  const destroyRef = inject(DestroyRef);
  ref.disableClose = true;
  let asking = false;
  const attempt = async () => {
    if (asking) return;
    if (!form.dirty) {
      ref.close();
      return;
    }
    asking = true;
    const answer = await firstValueFrom(
      dialog
        .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, {
          data: { title: 'Discard the changes?', message: `Closing now throws away ${what}.`, confirm: 'Discard' },
          width: '400px',
          maxWidth: '95vw',
        })
        .afterClosed(),
    );
    asking = false;
    if (answer) ref.close();
  };
  ref
    .keydownEvents()
    .pipe(takeUntilDestroyed(destroyRef))
    .subscribe((e) => {
      if (e.key === 'Escape') {
        e.preventDefault();
        void attempt();
      }
    });
  ref
    .backdropClick()
    .pipe(takeUntilDestroyed(destroyRef))
    .subscribe(() => void attempt());
}

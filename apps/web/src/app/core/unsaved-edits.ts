import { DestroyRef, Injectable, inject } from '@angular/core';
import { MatDialog } from '@angular/material/dialog';
import { firstValueFrom } from 'rxjs';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';

interface Tracked {
  /** Whether edits are waiting (a form changed and not saved; false for a read-only form). */
  dirty: () => boolean;
  /** What the edits are, for the question ("the runs of Thursday 3 December"). */
  what: () => string;
}

/**
 * The forms with a Save on screen (not dialogs: a dialog covers the top bar while open), so that a
 * step that throws the page away, such as switching depot, asks before it discards their edits.
 */
@Injectable({ providedIn: 'root' })
export class UnsavedEdits {
  private readonly dialog = inject(MatDialog);
  private readonly tracked = new Set<Tracked>();

  /** Tracks a form's edits until `destroyRef` ends. */
  track(dirty: () => boolean, what: () => string, destroyRef: DestroyRef): void {
    const entry: Tracked = { dirty, what };
    this.tracked.add(entry);
    destroyRef.onDestroy(() => this.tracked.delete(entry));
  }

  /** What holds edits not saved, one line each. */
  pending(): string[] {
    return [...this.tracked].filter((t) => t.dirty()).map((t) => t.what());
  }

  /** True when nothing is unsaved, or the person agrees to throw the edits away to `doing`. */
  async confirmDiscard(doing: string): Promise<boolean> {
    const pending = this.pending();
    if (pending.length === 0) return true;
    const list = pending.length === 1 ? pending[0]! : `${pending.slice(0, -1).join(', ')} and ${pending.at(-1)!}`;
    const data: ConfirmData = {
      title: 'Discard the changes?',
      message: `The changes to ${list} are not saved. ${doing} throws them away.`,
      confirm: 'Discard changes',
    };
    const answer = await firstValueFrom(
      this.dialog
        .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '440px', maxWidth: '95vw' })
        .afterClosed(),
    );
    return answer === true;
  }
}

/**
 * Tracks a form of the calling component with UnsavedEdits (call in an injection context):
 * `dirty` says whether it holds edits not saved, `what` names them.
 */
export function trackUnsaved(dirty: () => boolean, what: () => string): void {
  inject(UnsavedEdits).track(dirty, what, inject(DestroyRef));
}

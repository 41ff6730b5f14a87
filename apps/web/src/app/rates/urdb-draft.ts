import { Injectable, signal } from '@angular/core';
import type { UrdbImportResult } from '@nightyard/contracts';

/** A URDB record mapped by the API, waiting for review in the editor. Nothing is saved yet. */
export interface UrdbDraftValue extends UrdbImportResult {
  fileName: string;
}

/** Hands the mapped plan from the import on the Rates page to the editor (kept in memory only). */
@Injectable({ providedIn: 'root' })
export class UrdbDraft {
  readonly value = signal<UrdbDraftValue | null>(null);

  set(value: UrdbDraftValue): void {
    this.value.set(value);
  }

  /** Takes the draft (once): a reload or a second visit starts from a blank plan. */
  take(): UrdbDraftValue | null {
    const v = this.value();
    this.value.set(null);
    return v;
  }
}

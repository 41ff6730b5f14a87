import { DestroyRef, Injectable, inject } from '@angular/core';
import { FormArray, FormControl, FormGroup, type AbstractControl } from '@angular/forms';
import { Router } from '@angular/router';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SessionEnd } from './session-end';

const PREFIX = 'nightyard.draft:';

/** The page a draft belongs to: its path without query or fragment. */
function pageOf(url: string): string {
  return url.split(/[?#]/, 1)[0] ?? url;
}

/**
 * Unsaved form input survives the end of a session. Forms with a Save register here while they
 * are on screen; when the session ends (the person must sign in again), every form changed since
 * it was loaded is written to sessionStorage under its page and name. Back on that page after
 * sign-in, the form that registers under the same name gets its input back, still unsaved.
 * Nothing is kept on an ordinary sign-out or navigation. A draft belongs to the depot chosen when
 * it was typed: after sign-in on another depot it waits (a draft of one depot's set-up never
 * lands in another's form).
 */
@Injectable({ providedIn: 'root' })
export class FormDrafts {
  private readonly router = inject(Router);
  private readonly depots = inject(DepotListStore);
  private readonly open = new Map<string, { page: string; form: AbstractControl }>();

  /** The page of the current address, on the depot chosen now. */
  private here(): string {
    return `${this.depots.current()?.id ?? 'no-depot'}:${pageOf(this.router.url)}`;
  }

  constructor() {
    // Made with the first form that registers, and kept for the app's life (a root service).
    inject(SessionEnd).listen(() => this.keepAll());
  }

  /**
   * Registers the form under `name` on the current page until `destroyRef` ends; when a draft of
   * that form was kept, it is put back (marked dirty) and true is returned.
   */
  register(name: string, form: AbstractControl, destroyRef: DestroyRef): boolean {
    const page = this.here();
    const entry = { page, form };
    this.open.set(name, entry);
    destroyRef.onDestroy(() => {
      if (this.open.get(name) === entry) this.open.delete(name);
    });
    const draft = this.take(page, name);
    if (draft === undefined) return false;
    restoreInto(form, draft);
    form.markAsDirty();
    form.markAllAsTouched();
    return true;
  }

  /** The form of `name` no longer holds unsaved input worth keeping (saved, or the edit cancelled). */
  forget(name: string): void {
    this.open.delete(name);
  }

  /** Whether a draft of `name` waits on the current page (to open an editor before registering). */
  has(name: string): boolean {
    return storage()?.getItem(PREFIX + this.here() + '#' + name) != null;
  }

  /** Keeps every changed form on screen; called when the session has ended. */
  keepAll(): void {
    for (const [name, { page, form }] of this.open) {
      if (form.dirty) storage()?.setItem(PREFIX + page + '#' + name, JSON.stringify(form.getRawValue()));
    }
  }

  private take(page: string, name: string): unknown {
    const key = PREFIX + page + '#' + name;
    const raw = storage()?.getItem(key);
    if (raw == null) return undefined;
    storage()?.removeItem(key);
    try {
      return JSON.parse(raw) as unknown;
    } catch {
      return undefined;
    }
  }
}

/** Registers a form of the calling component with FormDrafts (call in an injection context). */
export function keepDraft(name: string, form: AbstractControl): boolean {
  return inject(FormDrafts).register(name, form, inject(DestroyRef));
}

function storage(): Storage | null {
  try {
    return typeof sessionStorage === 'undefined' ? null : sessionStorage;
  } catch {
    return null;
  }
}

/**
 * Puts a stored value back into a form of the same shape. Lists of plain fields grow or shrink to
 * the stored length (new fields copy the first one's validators); lists of groups are filled as
 * far as they reach.
 */
export function restoreInto(control: AbstractControl, value: unknown): void {
  if (control instanceof FormGroup) {
    if (!value || typeof value !== 'object') return;
    for (const [key, child] of Object.entries(control.controls)) {
      if (key in value) restoreInto(child as AbstractControl, (value as Record<string, unknown>)[key]);
    }
  } else if (control instanceof FormArray) {
    if (!Array.isArray(value)) return;
    const first = control.at(0) as AbstractControl | undefined;
    if (first instanceof FormControl || control.length === 0) {
      while (control.length > value.length) control.removeAt(control.length - 1);
      while (control.length < value.length) {
        control.push(
          new FormControl(null, {
            validators: first?.validator ?? null,
            asyncValidators: first?.asyncValidator ?? null,
          }),
        );
      }
    }
    value.slice(0, control.length).forEach((v, i) => restoreInto(control.at(i), v));
  } else {
    control.setValue(value);
  }
}

import { DestroyRef, Injectable, type Signal, computed, inject, resource, signal, untracked } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router } from '@angular/router';
import { toApiProblem } from '../core/api-error';
import { applyServerErrors } from '../shared/form-paths';
import type { ProblemItem } from '../shared/problem-summary';
import { collectErrors, where } from './rate-plan-errors';
import { checkDefinition, definitionOf, ratePlanForm, type RatePlanForm } from './rate-plan-form';
import { RatesApi } from './rates-api';
import { UrdbDraft } from './urdb-draft';

export type EditorMode = 'new' | 'import' | 'edit';

/** The route's parameters: the plan to edit (absent for a new one) and `from=urdb` after an import. */
export interface EditorRoute {
  id: Signal<string | undefined>;
  from: Signal<string | undefined>;
}

const none: Signal<undefined> = signal(undefined);

/**
 * The rate plan editor's state: the plan being edited (loaded), an imported draft or a blank
 * plan, its form, and saving (all or nothing). Provided by the page.
 */
@Injectable()
export class RatePlanEditorStore {
  private readonly api = inject(RatesApi);
  private readonly draft = inject(UrdbDraft);
  private readonly router = inject(Router);
  private readonly snackBar = inject(MatSnackBar);

  private readonly route = signal<EditorRoute>({ id: none, from: none });
  private readonly id = computed(() => this.route().id());
  private readonly from = computed(() => this.route().from());

  /** The plan to edit, as the API has it. */
  private readonly loaded = resource({
    params: () => this.id(),
    loader: ({ params: id }) => this.api.get(id),
  });
  readonly plan = computed(() => (this.loaded.hasValue() ? (this.loaded.value() ?? null) : null));
  readonly loading = this.loaded.isLoading;
  readonly loadProblem = computed(() => {
    const err = this.loaded.error();
    return err ? toApiProblem(err).message : null;
  });

  /** The plan mapped from a URDB file, waiting for review (kept in memory only, used once). */
  private readonly imported = computed(() =>
    !this.id() && this.from() === 'urdb' ? untracked(this.draft.value) : null,
  );
  readonly mode = computed<EditorMode>(() => (this.id() ? 'edit' : this.imported() ? 'import' : 'new'));
  readonly notes = computed(() => this.imported()?.notes ?? null);
  readonly fileName = computed(() => this.imported()?.fileName ?? null);
  /** Opened from an import whose file is no longer in memory (the page was reloaded). */
  readonly draftLost = computed(() => this.mode() === 'new' && this.from() === 'urdb');

  /** The form: the plan's, the import's or a blank one; null while the plan loads. */
  readonly form = computed<RatePlanForm | null>(() => {
    if (this.id()) {
      const plan = this.plan();
      return plan ? ratePlanForm(plan.name, plan.definition) : null;
    }
    const draft = this.imported();
    return draft ? ratePlanForm(draft.name, draft.definition) : ratePlanForm('');
  });

  readonly busy = signal(false);
  readonly problem = signal<string | null>(null);
  readonly problemItems = signal<ProblemItem[]>([]);

  constructor() {
    // The draft is taken once: a second visit starts from a blank plan.
    inject(DestroyRef).onDestroy(() => {
      if (this.imported()) this.draft.take();
    });
  }

  /** Binds the page's route parameters. */
  bind(route: EditorRoute): void {
    this.route.set(route);
  }

  /** Checks, then saves the plan and opens it; false when the form has errors (nothing sent, problems listed). */
  async save(f: RatePlanForm): Promise<boolean> {
    this.problem.set(null);
    this.problemItems.set([]);
    f.markAllAsTouched();
    if (f.valid) checkDefinition(f);
    if (f.invalid) {
      this.showProblems(f, 'Check the fields marked in red. Nothing was saved.');
      return false;
    }
    const body = { name: f.controls.name.value.trim(), definition: definitionOf(f) };
    this.busy.set(true);
    try {
      const current = this.plan();
      const saved = current ? await this.api.update(current.id, body) : await this.api.create(body);
      this.snackBar.open(`Rate plan "${saved.name}" saved`, 'OK');
      await this.router.navigate(['/rates', saved.id]);
      return true;
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(f, p.fields, 'definition');
      this.showProblems(
        f,
        `${p.message}. Nothing was saved.`.replace('..', '.'),
        rest.map((r) => ({ where: where(r.path), message: r.message })),
      );
      return false;
    } finally {
      this.busy.set(false);
    }
  }

  private showProblems(f: RatePlanForm, message: string, extra: ProblemItem[] = []): void {
    this.problem.set(message);
    this.problemItems.set([...collectErrors(f).map((e) => ({ where: where(e.path), message: e.message })), ...extra]);
  }
}

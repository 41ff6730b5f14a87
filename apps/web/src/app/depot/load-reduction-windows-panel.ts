import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule, type ValidatorFn } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { loadReductionWindowInputSchema, localDateTimeSchema, type LoadReductionWindow } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { LocalDateTimeField } from '../shared/local-date-time-field';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi, type LoadReductionWindowInput } from './depot-api';
import { formatKw, formatLocal } from './depot-setup-format';
import { trackUnsaved } from '../core/unsaved-edits';

const shape = loadReductionWindowInputSchema.shape;

const endAfterStart: ValidatorFn = (group) => {
  const start = group.get('start')?.value as string;
  const end = group.get('end')?.value as string;
  const endControl = group.get('end');
  if (start && end && end <= start) {
    endControl?.setErrors({ ...(endControl.errors ?? {}), order: 'The end must be after the start' });
  } else if (endControl?.hasError('order')) {
    const { order: _order, ...rest } = endControl.errors ?? {};
    endControl.setErrors(Object.keys(rest).length ? rest : null);
  }
  return null;
};

function windowGroup(w?: LoadReductionWindow) {
  return new FormGroup(
    {
      start: new FormControl(w?.start ?? '', {
        nonNullable: true,
        validators: zodValidator(localDateTimeSchema, 'Enter the start'),
      }),
      end: new FormControl(w?.end ?? '', {
        nonNullable: true,
        validators: zodValidator(localDateTimeSchema, 'Enter the end'),
      }),
      limitKw: new FormControl<number | null>(
        w?.limitKw ?? null,
        zodValidator(shape.limitKw, 'Enter the reduced limit in kW'),
      ),
      note: new FormControl(w?.note ?? '', { nonNullable: true }),
    },
    { validators: endAfterStart },
  );
}
type WindowGroup = ReturnType<typeof windowGroup>;
type WindowsForm = FormGroup<{ windows: FormArray<WindowGroup> }>;

/** Times when the utility asks the site to stay under a lower limit; saved all together. */
@Component({
  selector: 'ny-load-reduction-windows-panel',
  imports: [
    LocalDateTimeField,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatTableModule,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  templateUrl: './load-reduction-windows-panel.html',
  styleUrls: ['../shared/panel.scss', './load-reduction-windows-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoadReductionWindowsPanel {
  private readonly api = inject(DepotApi);
  private readonly snackBar = inject(MatSnackBar);

  readonly depotId = input.required<string>();
  readonly windows = input.required<readonly LoadReductionWindow[]>();
  readonly serviceLimitKw = input.required<number>();
  readonly timezone = input('UTC');
  readonly canEdit = input(false);
  readonly saved = output<LoadReductionWindow[]>();

  protected readonly error = errorText;
  protected readonly kw = formatKw;
  protected readonly columns = ['start', 'end', 'limitKw', 'note'];
  protected readonly rows = computed(() =>
    this.windows().map((w) => ({ window: w, start: formatLocal(w.start), end: formatLocal(w.end) })),
  );
  protected readonly form = signal<WindowsForm | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);

  constructor() {
    trackUnsaved(
      () => this.canEdit() && !!this.form()?.dirty,
      () => 'the load-reduction windows',
    );
  }

  protected edit(): void {
    this.clearProblems();
    const rows = this.windows().map((w) => windowGroup(w));
    this.form.set(new FormGroup({ windows: new FormArray(rows.length ? rows : [windowGroup()]) }));
  }

  protected cancel(): void {
    this.clearProblems();
    this.form.set(null);
  }

  protected add(form: FormArray<WindowGroup>): void {
    form.push(windowGroup());
  }

  protected removeRow(form: FormArray<WindowGroup>, i: number): void {
    form.removeAt(i);
  }

  protected async save(wrapper: WindowsForm): Promise<void> {
    const form = wrapper.controls.windows;
    this.clearProblems();
    this.checkLimitsAndOverlaps(form);
    if (form.invalid) {
      form.markAllAsTouched();
      this.problem.set('Check the windows marked in red. Nothing was saved.');
      return;
    }
    const body: LoadReductionWindowInput[] = form.getRawValue().map((w) => ({
      start: w.start,
      end: w.end,
      limitKw: w.limitKw ?? 0,
      note: w.note.trim(),
    }));
    this.busy.set(true);
    try {
      const windows = await this.api.replaceLoadReductionWindows(this.depotId(), body);
      this.form.set(null);
      this.saved.emit(windows);
      this.snackBar.open(
        windows.length === 1 ? '1 load-reduction window saved' : `${windows.length} load-reduction windows saved`,
        'OK',
      );
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(form, p.fields, 'windows');
      this.problem.set(`${p.message}. Nothing was saved.`.replace('..', '.'));
      this.problemItems.set(rest.map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }

  /** The API's own checks, run here first with the same words: under the service limit, no overlaps. */
  private checkLimitsAndOverlaps(form: FormArray<WindowGroup>): void {
    const limit = this.serviceLimitKw();
    form.controls.forEach((g) => {
      const c = g.controls.limitKw;
      if (typeof c.value === 'number' && c.value > limit) {
        c.setErrors({ server: `Above the service limit (${limit} kW): a reduced limit must be lower` });
      }
    });
    const rows = form
      .getRawValue()
      .map((w, i) => ({ ...w, i }))
      .filter((w) => w.start && w.end && w.end > w.start);
    rows.sort((a, b) => a.start.localeCompare(b.start));
    for (let k = 1; k < rows.length; k++) {
      if (rows[k]!.start < rows[k - 1]!.end) {
        form.at(rows[k]!.i).controls.start.setErrors({ server: `Overlaps the window starting ${rows[k - 1]!.start}` });
      }
    }
  }

  private clearProblems(): void {
    this.problem.set(null);
    this.problemItems.set([]);
  }
}

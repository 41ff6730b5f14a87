import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule, type ValidatorFn } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import {
  crewShiftSchema,
  DEFAULT_YARD_CREW,
  yardCrewSchema,
  type CrewShift,
  type YardCrew,
} from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi } from './depot-api';
import { trackUnsaved } from '../core/unsaved-edits';

// The contract's own messages ("At least 1 move", "Write the time as HH:mm, 00:00 to 23:59"), not
// zod's ("Too small: expected number to be >=1", "Invalid string: must match pattern …").
const clockText = crewShiftSchema.shape.from;
const moves = crewShiftSchema.shape.movesPerSlot;

/**
 * The contract's rule across a shift's times (one that ends when it starts), said on its "to"
 * before saving, in the contract's words. The moves are checked on their own control: a valid
 * stand-in lets the rule run whatever they hold.
 */
const shiftTimes: ValidatorFn = (group) => {
  const to = group.get('to');
  if (!to) return null;
  const { from, to: until } = group.value as { from: string; to: string };
  const parsed = crewShiftSchema.safeParse({ from, to: until, movesPerSlot: 1 });
  const issue = parsed.success ? undefined : parsed.error.issues.find((i) => i.code === 'custom' && i.path[0] === 'to');
  const { shiftTimes: _, ...others } = to.errors ?? {};
  const errors = issue ? { ...others, shiftTimes: issue.message } : others;
  to.setErrors(Object.keys(errors).length ? errors : null);
  return null;
};

/** The week as the form shows it, Monday first (ISO weekdays 1 to 7). */
const WEEK = [
  { day: 1, short: 'Mon', name: 'Monday' },
  { day: 2, short: 'Tue', name: 'Tuesday' },
  { day: 3, short: 'Wed', name: 'Wednesday' },
  { day: 4, short: 'Thu', name: 'Thursday' },
  { day: 5, short: 'Fri', name: 'Friday' },
  { day: 6, short: 'Sat', name: 'Saturday' },
  { day: 7, short: 'Sun', name: 'Sunday' },
] as const;

/** A shift's days in words: "every day", "Mon-Fri", "Sat, Sun", "Mon-Wed, Fri". */
export function daysText(days: readonly number[] | undefined): string {
  const on = new Set(days ?? WEEK.map((w) => w.day));
  if (on.size === 7) return 'every day';
  const runs: string[] = [];
  for (let i = 0; i < 7; i++) {
    if (!on.has(i + 1)) continue;
    let j = i;
    while (j + 1 < 7 && on.has(j + 2)) j++;
    runs.push(
      j - i >= 2
        ? `${WEEK[i]!.short}-${WEEK[j]!.short}`
        : WEEK.slice(i, j + 1)
            .map((w) => w.short)
            .join(', '),
    );
    i = j;
  }
  return runs.join(', ');
}

/** At least one day ticked: the contract's words. */
const someDay: ValidatorFn = (days) =>
  (days.value as boolean[]).some(Boolean) ? null : { zod: 'Choose at least one day for the shift' };

function shiftGroup(s: CrewShift | null) {
  const on = new Set(s?.days ?? WEEK.map((w) => w.day));
  return new FormGroup(
    {
      from: new FormControl(s?.from ?? '', {
        nonNullable: true,
        validators: zodValidator(clockText, 'Write the time as HH:mm'),
      }),
      to: new FormControl(s?.to ?? '', {
        nonNullable: true,
        validators: zodValidator(clockText, 'Write the time as HH:mm'),
      }),
      movesPerSlot: new FormControl<number | null>(s?.movesPerSlot ?? 2, zodValidator(moves, 'Enter 1 to 50 moves')),
      days: new FormArray(
        WEEK.map((w) => new FormControl(on.has(w.day), { nonNullable: true })),
        someDay,
      ),
    },
    { validators: shiftTimes },
  );
}

function crewForm(c: YardCrew) {
  return new FormGroup({
    minPlugInMinutes: new FormControl<number | null>(
      c.minPlugInMinutes,
      zodValidator(yardCrewSchema.shape.minPlugInMinutes, 'Enter 0 to 240 minutes'),
    ),
    driversPlugIn: new FormControl(c.driversPlugIn, { nonNullable: true }),
    shifts: new FormArray(c.shifts.map((s) => shiftGroup(s))),
    costTolerancePercent: new FormControl<number | null>(
      c.costTolerancePercent,
      zodValidator(yardCrewSchema.shape.costTolerancePercent, 'Enter 0 to 10 %'),
    ),
    costToleranceAmount: new FormControl<number | null>(
      c.costToleranceAmount,
      zodValidator(yardCrewSchema.shape.costToleranceAmount, 'Enter 0 to 1,000'),
    ),
  });
}
type CrewForm = ReturnType<typeof crewForm>;

/**
 * The yard crew plans keep to: the shortest plug-in, whether drivers plug in on pulling in and
 * unplug on pulling out, and the crew's shifts with the moves they can make per 15 minutes.
 */
@Component({
  selector: 'ny-yard-crew-panel',
  imports: [
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  template: `
    <section class="panel" aria-labelledby="depot-crew-heading">
      <div class="panel-header">
        <h2 id="depot-crew-heading">Yard crew</h2>
        @if (canEdit() && !form()) {
          <button mat-stroked-button type="button" (click)="edit()"><mat-icon>edit</mat-icon>Edit yard crew</button>
        }
      </div>
      <p class="hint">
        Every plug-in and unplug is a move. A driver's move is made on pulling in or out; every other move is a crew
        move, planned only inside a crew shift and at most so many per 15 minutes.
      </p>
      @if (form(); as f) {
        <form [formGroup]="f" (ngSubmit)="save(f)" novalidate class="ny-dense">
          <div class="form-grid crew-grid">
            <mat-form-field appearance="outline" subscriptSizing="dynamic">
              <mat-label>Minimum plug-in</mat-label>
              <input matInput type="number" min="0" max="240" step="5" formControlName="minPlugInMinutes" />
              <span matTextSuffix>min</span>
              <mat-hint>A bus that stays less is plugged in for its whole stay</mat-hint>
              <mat-error>{{ error(f.controls.minPlugInMinutes) }}</mat-error>
            </mat-form-field>
            <mat-checkbox formControlName="driversPlugIn"
              >Drivers plug in on pulling in and unplug on pulling out</mat-checkbox
            >
          </div>
          <fieldset>
            <legend>Crew shifts</legend>
            <p class="hint">A shift that runs past midnight belongs to the day it starts.</p>
            @for (g of f.controls.shifts.controls; track g; let i = $index) {
              <div class="form-grid crew-grid" [formGroup]="g">
                <mat-form-field appearance="outline">
                  <mat-label>Shift {{ i + 1 }} from</mat-label>
                  <input matInput formControlName="from" placeholder="15:00" autocomplete="off" />
                  <mat-error>{{ error(g.controls.from) }}</mat-error>
                </mat-form-field>
                <mat-form-field appearance="outline" subscriptSizing="dynamic">
                  <mat-label>Shift {{ i + 1 }} to</mat-label>
                  <input matInput formControlName="to" placeholder="23:30" autocomplete="off" />
                  <mat-hint>Before "from": past midnight</mat-hint>
                  <mat-error>{{ error(g.controls.to) }}</mat-error>
                </mat-form-field>
                <mat-form-field appearance="outline">
                  <mat-label>Shift {{ i + 1 }} crew moves per 15 minutes</mat-label>
                  <input matInput type="number" min="1" max="50" step="1" formControlName="movesPerSlot" />
                  <mat-error>{{ error(g.controls.movesPerSlot) }}</mat-error>
                </mat-form-field>
                <button
                  mat-icon-button
                  type="button"
                  [attr.aria-label]="'Remove shift ' + (i + 1)"
                  (click)="f.controls.shifts.removeAt(i)"
                >
                  <mat-icon>delete</mat-icon>
                </button>
                <div class="days" role="group" [attr.aria-label]="'Shift ' + (i + 1) + ' days'">
                  @for (w of week; track w.day; let d = $index) {
                    <mat-checkbox
                      [formControl]="g.controls.days.controls[d]!"
                      [aria-label]="'Shift ' + (i + 1) + ' on ' + w.name"
                      >{{ w.short }}</mat-checkbox
                    >
                  }
                  @if (g.controls.days.invalid) {
                    <p class="days-error" role="alert">{{ error(g.controls.days) }}</p>
                  }
                </div>
              </div>
            } @empty {
              <p class="hint">No shift listed: plans assume someone can make a crew move at any hour.</p>
            }
            @if (f.controls.shifts.length < 6) {
              <button mat-stroked-button type="button" (click)="f.controls.shifts.push(newShift())">
                <mat-icon>add</mat-icon>Add shift
              </button>
            }
          </fieldset>
          <fieldset>
            <legend>Fewer moves and steadier re-plans</legend>
            <p class="hint">
              A plan may cost this much more than the cheapest found to need fewer crew moves, or, when the night is
              planned again, to move fewer buses: the per cent of the night's cost or the amount, whichever is larger.
            </p>
            <div class="form-grid">
              <mat-form-field appearance="outline">
                <mat-label>Cost tolerance, share of the night</mat-label>
                <input matInput type="number" min="0" max="10" step="0.1" formControlName="costTolerancePercent" />
                <span matTextSuffix>%</span>
                <mat-error>{{ error(f.controls.costTolerancePercent) }}</mat-error>
              </mat-form-field>
              <mat-form-field appearance="outline">
                <mat-label>Cost tolerance, amount a night</mat-label>
                <input matInput type="number" min="0" max="1000" step="1" formControlName="costToleranceAmount" />
                <span matTextSuffix>{{ currency() ?? "in the rate plan's currency" }}</span>
                <mat-error>{{ error(f.controls.costToleranceAmount) }}</mat-error>
              </mat-form-field>
            </div>
          </fieldset>
          <ny-problem-summary [message]="problem()" [items]="problemItems()" />
          @if (busy()) {
            <mat-progress-bar mode="indeterminate" aria-label="Saving the yard crew" />
          }
          <div class="form-actions">
            <button mat-button type="button" (click)="form.set(null)">Cancel</button>
            <button mat-flat-button type="submit" [disabled]="busy()">Save yard crew</button>
          </div>
        </form>
      } @else {
        <dl class="facts">
          <div>
            <dt>Minimum plug-in</dt>
            <dd>{{ crew().minPlugInMinutes ? crew().minPlugInMinutes + ' min' : 'None' }}</dd>
          </div>
          <div>
            <dt>Driver moves</dt>
            <dd>
              {{
                crew().driversPlugIn
                  ? 'Drivers plug in on pulling in and unplug on pulling out'
                  : 'The crew makes every move'
              }}
            </dd>
          </div>
          <div class="wide">
            <dt>Crew shifts</dt>
            <dd>{{ shiftsText() }}</dd>
          </div>
          <div class="wide">
            <dt>Cost tolerance for fewer moves</dt>
            <dd>
              {{ crew().costTolerancePercent }} % of the night's cost or {{ amount(crew().costToleranceAmount) }},
              whichever is larger
            </dd>
          </div>
        </dl>
      }
    </section>
  `,
  styleUrls: ['../shared/panel.scss'],
  // Hints that wrap take their own lines (subscriptSizing="dynamic"): the rows and the fields
  // stacked on a phone keep room between them for the next field's floating label.
  styles: `
    .crew-grid {
      row-gap: 12px;
      margin-bottom: 12px;
    }
    .days {
      grid-column: 1 / -1;
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 0 4px;
    }
    .days-error {
      margin: 0;
      color: var(--mat-sys-error);
      font: var(--mat-sys-body-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class YardCrewPanel {
  private readonly api = inject(DepotApi);
  private readonly snackBar = inject(MatSnackBar);

  readonly depotId = input.required<string>();
  readonly yardCrew = input<YardCrew | null>(null);
  /** The rate plan's currency; null without a rate plan. */
  readonly currency = input<string | null>(null);
  /** The tolerance's amount as money ("$5.00"), or with no rate plan a bare figure. */
  protected amount(v: number): string {
    const c = this.currency();
    return c
      ? new Intl.NumberFormat('en-US', { style: 'currency', currency: c }).format(v)
      : `${v} in the rate plan's currency`;
  }
  readonly canEdit = input(false);
  readonly saved = output<YardCrew>();

  protected readonly error = errorText;
  protected readonly form = signal<CrewForm | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);
  protected readonly crew = computed(() => this.yardCrew() ?? DEFAULT_YARD_CREW);
  protected readonly shiftsText = computed(() => {
    const shifts = this.crew().shifts;
    if (!shifts.length) return 'None listed: crew moves at any hour';
    return shifts
      .map(
        (s) =>
          `${s.from}-${s.to} ${daysText(s.days)}, ${s.movesPerSlot} ${s.movesPerSlot === 1 ? 'move' : 'moves'} per 15 min`,
      )
      .join('; ');
  });

  constructor() {
    trackUnsaved(
      () => this.canEdit() && !!this.form()?.dirty,
      () => 'the yard crew',
    );
  }

  protected readonly week = WEEK;

  protected newShift() {
    return shiftGroup(null);
  }

  protected edit(): void {
    this.problem.set(null);
    this.problemItems.set([]);
    this.form.set(crewForm(this.crew()));
  }

  protected async save(form: CrewForm): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    if (form.invalid) {
      form.markAllAsTouched();
      this.problem.set('Check the fields marked in red.');
      return;
    }
    const v = form.getRawValue();
    const body: YardCrew = {
      minPlugInMinutes: v.minPlugInMinutes ?? 0,
      driversPlugIn: v.driversPlugIn,
      shifts: v.shifts.map((s) => {
        const days = WEEK.filter((_, d) => s.days[d]).map((w) => w.day);
        // Every day ticked: the shift as before days existed (no list).
        return { from: s.from, to: s.to, movesPerSlot: s.movesPerSlot ?? 1, ...(days.length < 7 ? { days } : {}) };
      }),
      costTolerancePercent: v.costTolerancePercent ?? 0.5,
      costToleranceAmount: v.costToleranceAmount ?? 5,
    };
    this.busy.set(true);
    try {
      const saved = await this.api.saveYardCrew(this.depotId(), body);
      this.form.set(null);
      this.saved.emit(saved);
      this.snackBar.open('Yard crew saved', 'OK');
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyServerErrors(form, p.fields);
      // The API names fields by path ("Check these fields: shifts[1].to"): where each is marked on
      // its control, the summary says so in words.
      this.problem.set(Object.keys(p.fields).length && !rest.length ? 'Check the fields marked in red.' : p.message);
      this.problemItems.set(rest.map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }
}

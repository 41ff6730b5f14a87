import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  afterRenderEffect,
  computed,
  effect,
  input,
  output,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { ClockTimeInput, clockTimeValidator } from '../shared/clock-time-input';
import { relative, type StepView } from './yard-format';

/** A late confirmation: the step and the depot time it really happened. */
export interface ConfirmAt {
  view: StepView;
  at: string;
}

let nextId = 0;

/**
 * One overdue step: confirmed with the time it really happened (depot time, HH:mm), or said not to
 * have happened, which re-plans the rest of the night (asked twice, since it publishes a revision).
 */
@Component({
  selector: 'ny-overdue-step',
  imports: [ClockTimeInput, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ReactiveFormsModule],
  templateUrl: './overdue-step.html',
  styleUrl: './overdue-step.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '[attr.data-step]': 'view().step.key' },
})
export class OverdueStep {
  readonly view = input.required<StepView>();
  readonly now = input.required<number>();
  /** The server is re-planning from this step. */
  readonly busy = input(false);

  readonly confirmAt = output<ConfirmAt>();
  readonly missed = output<StepView>();

  protected readonly id = `ny-overdue-${nextId++}`;
  protected readonly time = new FormControl('', {
    nonNullable: true,
    validators: clockTimeValidator('Enter the time it happened'),
  });
  protected readonly asking = signal(false);
  /** The button that was pressed is replaced by the question: focus moves with it, and back. */
  private readonly yesButton = viewChild('yes', { read: ElementRef<HTMLButtonElement> });
  private readonly askButton = viewChild('ask', { read: ElementRef<HTMLButtonElement> });
  private focusAsk = false;
  protected readonly due = computed(
    () => `Due ${this.view().time}, ${relative(Date.parse(this.view().step.at), this.now())}`,
  );
  protected readonly consequence = computed(() => {
    const s = this.view().step;
    return s.action === 'connect'
      ? `Bus ${s.bus} is taken as not plugged in, and the rest of the night is re-planned.`
      : `Bus ${s.bus} is taken as still on charger ${s.charger}, and the rest of the night is re-planned.`;
  });

  constructor() {
    // After rendering: the question's buttons exist (or are gone) by then.
    afterRenderEffect(() => {
      const yes = this.yesButton()?.nativeElement;
      const ask = this.askButton()?.nativeElement;
      if (yes) yes.focus();
      else if (ask && this.focusAsk) {
        this.focusAsk = false;
        ask.focus();
      }
    });
    // The planned time to start from: most late steps happened about then. As HH:mm, the field's
    // format, on a weekend's night too (whose steps show their day: "Fri 17:00").
    effect(() => {
      const time = this.view().clockTime;
      untracked(() => {
        if (!this.time.dirty) this.time.setValue(time);
      });
    });
  }

  protected confirm(): void {
    this.time.markAsTouched();
    if (this.time.invalid) return;
    this.confirmAt.emit({ view: this.view(), at: this.time.value.trim() });
  }

  protected cancelAsking(): void {
    this.focusAsk = true;
    this.asking.set(false);
  }

  protected sayMissed(): void {
    this.focusAsk = true;
    this.asking.set(false);
    this.missed.emit(this.view());
  }
}

import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  inject,
  input,
  signal,
  type AfterViewInit,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, NgControl, ReactiveFormsModule, type ControlValueAccessor } from '@angular/forms';
import type { ErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { CLOCK_TIME, CLOCK_TIME_MESSAGE, ISO_DATE } from '@nightyard/contracts/depot-time';
import { ClockTimeInput } from './clock-time-input';
import { errorText } from './form-paths';

/**
 * A local wall-clock date and time at the depot (`YYYY-MM-DDTHH:mm`, the API's form) as two
 * fields: the date, and the time written `HH:mm`, 24-hour (the browser's date-and-time field
 * shows a 12-hour clock in many languages). Use it with `formControlName`; the control's errors
 * (its own, the form's, the server's) show under the time.
 */
@Component({
  selector: 'ny-local-date-time-field',
  imports: [ClockTimeInput, MatFormFieldModule, MatInputModule, ReactiveFormsModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-local-date-time-field' },
  template: `
    <mat-form-field appearance="outline" subscriptSizing="dynamic">
      <mat-label>{{ label() }} date</mat-label>
      <input matInput type="date" [formControl]="dateControl" [errorStateMatcher]="matcher" (blur)="touched()" />
    </mat-form-field>
    <mat-form-field appearance="outline" subscriptSizing="dynamic">
      <mat-label>{{ label() }} time</mat-label>
      <input matInput nyClockTime [formControl]="timeControl" [errorStateMatcher]="matcher" (blur)="touched()" />
      <mat-error>{{ message() }}</mat-error>
    </mat-form-field>
  `,
  styles: `
    :host {
      display: grid;
      grid-template-columns: minmax(0, 1.2fr) minmax(0, 1fr);
      gap: 8px;
    }
  `,
})
export class LocalDateTimeField implements ControlValueAccessor, AfterViewInit {
  private readonly ngControl = inject(NgControl, { self: true, optional: true });
  private readonly destroyRef = inject(DestroyRef);
  /** Moves on with every change of the control (errors set by the form or the server too). */
  private readonly version = signal(0);

  /** "Start" gives the fields "Start date" and "Start time". */
  readonly label = input.required<string>();

  protected readonly dateControl = new FormControl('', { nonNullable: true });
  protected readonly timeControl = new FormControl('', { nonNullable: true });
  /** The time as typed (trimmed). */
  private readonly time = signal('');

  /** The fields show red when the whole value is wrong (not only a part of it). */
  protected readonly matcher: ErrorStateMatcher = {
    isErrorState: () => {
      this.version();
      const c = this.ngControl?.control;
      return (!!c && c.invalid && (c.touched || c.dirty)) || this.badTime();
    },
  };

  private onChange: (value: string) => void = () => undefined;
  private onTouched: () => void = () => undefined;

  constructor() {
    if (this.ngControl) this.ngControl.valueAccessor = this;
    this.dateControl.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.emit());
    this.timeControl.valueChanges.pipe(takeUntilDestroyed()).subscribe((t) => {
      this.time.set(t.trim());
      this.emit();
    });
  }

  ngAfterViewInit(): void {
    // The form's control is known by now: follow its errors (the form's, the server's) and touches.
    this.ngControl?.control?.events
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => this.version.update((n) => n + 1));
  }

  protected message(): string {
    this.version();
    if (this.badTime()) return CLOCK_TIME_MESSAGE;
    return errorText(this.ngControl?.control ?? null);
  }

  /** A time typed that is not HH:mm (the value then stays empty, so the control says "Enter ..."). */
  private badTime(): boolean {
    const t = this.time();
    return t !== '' && !CLOCK_TIME.test(t);
  }

  protected touched(): void {
    this.onTouched();
  }

  private emit(): void {
    const d = this.dateControl.value;
    const t = this.time();
    this.onChange(ISO_DATE.test(d) && CLOCK_TIME.test(t) ? `${d}T${t}` : '');
  }

  writeValue(value: unknown): void {
    const m = typeof value === 'string' ? /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})/.exec(value) : null;
    this.dateControl.setValue(m ? m[1]! : '', { emitEvent: false });
    this.timeControl.setValue(m ? m[2]! : '', { emitEvent: false });
    this.time.set(m ? m[2]! : '');
  }

  registerOnChange(fn: (value: string) => void): void {
    this.onChange = fn;
  }

  registerOnTouched(fn: () => void): void {
    this.onTouched = fn;
  }

  setDisabledState(disabled: boolean): void {
    for (const c of [this.dateControl, this.timeControl]) {
      if (disabled) c.disable({ emitEvent: false });
      else c.enable({ emitEvent: false });
    }
  }
}

import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { ClockTimeInput, clockTimeValidator } from './clock-time-input';

@Component({
  imports: [ClockTimeInput, MatFormFieldModule, MatInputModule, ReactiveFormsModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <mat-form-field>
      <mat-label>Pull-out</mat-label>
      <input matInput nyClockTime [formControl]="time" />
      <mat-error>{{ time.errors?.['message'] }}</mat-error>
    </mat-form-field>
  `,
})
class Host {
  readonly time = new FormControl('', { nonNullable: true, validators: clockTimeValidator('Enter the pull-out time') });
}

describe('ClockTimeInput', () => {
  it('checks HH:mm, 24-hour, and says how to write it', () => {
    const v = clockTimeValidator('Enter the time');
    const check = (value: string) => v(new FormControl(value));
    expect(check('')).toEqual({ message: 'Enter the time' });
    expect(check('21:30')).toBeNull();
    expect(check('00:00')).toBeNull();
    expect(check('23:59')).toBeNull();
    for (const bad of ['24:00', '9:30', '9:30 PM', '21:60', '2130']) {
      expect(check(bad)).toEqual({ message: 'Write the time as HH:mm, 24-hour (for example 21:30)' });
    }
    expect(clockTimeValidator('Enter it', 'contract')(new FormControl('7pm'))).toEqual({
      contract: 'Write the time as HH:mm, 24-hour (for example 21:30)',
    });
  });

  it('is a labelled text field (not the 12-hour time field) that writes typed digits as HH:mm when left', async () => {
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const input = (fixture.nativeElement as HTMLElement).querySelector('input')!;
    expect(input.type).toBe('text');
    expect(input.getAttribute('inputmode')).toBe('numeric');
    expect(input.getAttribute('placeholder')).toBe('HH:mm');
    expect(input.labels?.[0]?.textContent).toContain('Pull-out');

    input.value = '2130';
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
    await fixture.whenStable();
    expect(fixture.componentInstance.time.value).toBe('21:30');
    expect(fixture.componentInstance.time.valid).toBe(true);

    input.value = '25:10';
    input.dispatchEvent(new Event('input'));
    input.dispatchEvent(new Event('blur'));
    fixture.detectChanges();
    await fixture.whenStable();
    expect(fixture.componentInstance.time.value).toBe('25:10');
    expect(fixture.nativeElement.textContent).toContain('Write the time as HH:mm, 24-hour');
  });
});

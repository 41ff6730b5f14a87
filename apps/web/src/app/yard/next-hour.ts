import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { relative, type StepView } from './yard-format';

/**
 * The next hour across all chargers, in time order: what a crew of one or two walks the yard by.
 * The same steps (and words) as the charger cards; the cautions stay beside each.
 */
@Component({
  selector: 'ny-next-hour',
  imports: [MatIconModule],
  template: `
    <h2 id="ny-next-hour-title">Next hour, all chargers</h2>
    @if (steps().length) {
      <ol>
        @for (s of steps(); track s.step.key) {
          <li [attr.data-step]="s.step.key" [class.urgent]="s.reason !== null">
            <span class="time">{{ s.time }}</span>
            <span class="what">
              <span class="title">{{ s.title }}</span>
              <span class="when">{{ when(s) }}</span>
              <span class="step-caution">
                <mat-icon aria-hidden="true">electric_bolt</mat-icon>
                {{ s.caution }}
              </span>
            </span>
          </li>
        }
      </ol>
    } @else {
      <p class="plain">No step is due in the next hour.</p>
    }
  `,
  styleUrl: './next-hour.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { role: 'region', 'aria-labelledby': 'ny-next-hour-title' },
})
export class NextHour {
  readonly steps = input.required<readonly StepView[]>();
  readonly now = input.required<number>();

  protected when(s: StepView): string {
    const at = Date.parse(s.step.at);
    return at <= this.now() ? 'Due now' : relative(at, this.now());
  }
}

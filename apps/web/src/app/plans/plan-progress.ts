import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { PlanSummary } from '@nightyard/contracts';

/** A version the engine is still working on: which step, and that the page may be left meanwhile. */
@Component({
  selector: 'ny-plan-progress',
  imports: [MatProgressBarModule],
  template: `
    @let s = plan();
    <p class="strong">Step {{ s.status === 'queued' ? 1 : 2 }} of 2: {{ s.stage }}</p>
    <mat-progress-bar [mode]="s.status === 'queued' ? 'query' : 'indeterminate'" aria-label="Generating the plan" />
    <p class="meta">The engine runs in the background; you can leave this page and come back.</p>
  `,
  styleUrl: './plan-progress.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'progress' },
})
export class PlanProgress {
  readonly plan = input.required<Pick<PlanSummary, 'status' | 'stage'>>();
}

import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { AdoptedPlan, PlanSummary } from '@nightyard/contracts';

/** What a version is: a what-if study, a draft adopted from one, published or superseded. */
@Component({
  selector: 'ny-version-notes',
  imports: [MatIconModule],
  templateUrl: './version-notes.html',
  styleUrl: './version-notes.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionNotes {
  readonly plan = input.required<PlanSummary>();
  readonly canPlan = input(false);
  /** The what-if adopted on this page, if any: shown above the draft it made. */
  readonly adopted = input<AdoptedPlan | null>(null);

  protected readonly adoptedHere = computed(() => {
    const a = this.adopted();
    return a && a.plan.id === this.plan().id ? a : null;
  });
  protected readonly adoptedSentence = computed(() => {
    const a = this.adoptedHere();
    if (!a) return '';
    const n = a.adoption.differences.length;
    return (
      `Adopted from what-if version ${a.adoption.whatIf.version}, re-checked against the depot as it is now: ` +
      (n === 0
        ? 'nothing differed from the study.'
        : `${n === 1 ? '1 difference' : `${n} differences`} from the study, the depot's data used.`)
    );
  });
}

import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { SECTIONS, type SectionKey } from '@nightyard/contracts';
import { DepotTimeNote } from '../core/depot-time-note';

/**
 * A section page's heading (the section's label) and its purpose from SECTIONS, with the note
 * that times are the depot's when the viewer is in another zone.
 */
@Component({
  selector: 'ny-section-intro',
  imports: [DepotTimeNote],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="ny-page-header">
      <div>
        <h1>{{ info().label }}</h1>
        <p class="ny-lead">{{ info().purpose }}</p>
        @if (timeNote()) {
          <ny-depot-time-note />
        }
      </div>
      <ng-content />
    </div>
  `,
})
export class SectionIntro {
  readonly section = input.required<SectionKey>();
  /** The note on the depot's zone (off for pages spanning depots, each with its own zone). */
  readonly timeNote = input(true);
  protected readonly info = computed(() => {
    const found = SECTIONS.find((s) => s.key === this.section());
    if (!found) throw new Error(`Unknown section ${this.section()}`);
    return found;
  });
}

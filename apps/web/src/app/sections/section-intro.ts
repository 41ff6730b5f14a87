import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { SECTIONS, type SectionKey } from '@nightyard/contracts';

/** A section page's heading (the section's label) and its purpose from SECTIONS. */
@Component({
  selector: 'ny-section-intro',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="ny-page-header">
      <div>
        <h1>{{ info().label }}</h1>
        <p class="ny-lead">{{ info().purpose }}</p>
      </div>
      <ng-content />
    </div>
  `,
})
export class SectionIntro {
  readonly section = input.required<SectionKey>();
  protected readonly info = computed(() => {
    const found = SECTIONS.find((s) => s.key === this.section());
    if (!found) throw new Error(`Unknown section ${this.section()}`);
    return found;
  });
}

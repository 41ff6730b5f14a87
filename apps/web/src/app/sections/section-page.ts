import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { SECTIONS, type SectionKey } from '@nightyard/contracts';
import { CurrentDepot } from '../depots/current-depot';
import { SectionIntro } from './section-intro';

/**
 * A section whose own tools are still to come (Yard, Plans, Fleet, Depot, Rates, Costs): its
 * title, its purpose and the depot it works on. The route's data `section` picks the section.
 */
@Component({
  selector: 'ny-section-page',
  imports: [CurrentDepot, MatIconModule, SectionIntro],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
  template: `
    <ny-section-intro [section]="section()" />
    <p class="pending">
      <mat-icon>construction</mat-icon>
      <span>The {{ label() }} tools are not built yet. This is the depot they will work on.</span>
    </p>
    <ny-current-depot />
  `,
  styles: `
    .pending {
      display: flex;
      align-items: center;
      gap: 8px;
      margin: 0 0 16px;
      color: var(--mat-sys-on-surface-variant);
    }
  `,
})
export class SectionPage {
  /** Bound from the route's data. */
  readonly section = input.required<SectionKey>();
  protected readonly label = computed(() => SECTIONS.find((s) => s.key === this.section())?.label ?? '');
}

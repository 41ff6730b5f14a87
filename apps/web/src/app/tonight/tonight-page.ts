import { ChangeDetectionStrategy, Component } from '@angular/core';
import { CurrentDepot } from '../depots/current-depot';
import { SectionIntro } from '../sections/section-intro';

/** The night ahead at a glance. For now: the depot's summary, shown large. */
@Component({
  selector: 'ny-tonight-page',
  imports: [CurrentDepot, SectionIntro],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
  template: `
    <ny-section-intro section="tonight" />
    <ny-current-depot [prominent]="true" />
  `,
})
export class TonightPage {}

import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, resource } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { DistrictOverview, SectionKey } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { AuthStore } from '../auth/auth-store';
import { toApiProblem } from '../core/api-error';
import { injectIsPhone } from '../core/layout';
import { SectionIntro } from '../sections/section-intro';
import { districtView } from './district-format';

/** The sections a depot's row links to, each opening on that depot. */
const DEPOT_LINKS: readonly { key: SectionKey; label: string }[] = [
  { key: 'tonight', label: 'Tonight' },
  { key: 'plans', label: 'Plans' },
  { key: 'costs', label: 'Costs' },
];

/**
 * The District section (administrators and finance): every depot the person may see, tonight
 * and the billing period side by side, with totals; each depot links to its own Tonight, Plans
 * and Costs (the link switches to that depot).
 */
@Component({
  selector: 'ny-district-page',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink, SectionIntro],
  templateUrl: './district-page.html',
  styleUrl: './district-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class DistrictPage {
  private readonly http = inject(HttpClient);
  private readonly auth = inject(AuthStore);
  protected readonly phone = injectIsPhone();

  private readonly overview = resource({
    loader: () => firstValueFrom(this.http.get<DistrictOverview>('/api/district')),
  });
  protected readonly loading = this.overview.isLoading;
  protected readonly problem = computed(() => {
    const err = this.overview.error();
    return err ? toApiProblem(err).message : null;
  });
  protected readonly view = computed(() => (this.overview.hasValue() ? districtView(this.overview.value()) : null));
  /** Whether any depot has a demand target (the column shows only then). */
  protected readonly anyTarget = computed(() => this.view()?.rows.some((r) => r.target !== null) ?? false);
  protected readonly links = computed(() => {
    const open = new Set(this.auth.sections().map((s) => s.key));
    return DEPOT_LINKS.filter((l) => open.has(l.key));
  });

  protected reload(): void {
    this.overview.reload();
  }
}

import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink, RouterLinkActive } from '@angular/router';

/** The Fleet section's two pages as tabs: the buses and a service day's runs. */
@Component({
  selector: 'ny-fleet-tabs',
  imports: [MatTabsModule, RouterLink, RouterLinkActive],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <nav mat-tab-nav-bar mat-stretch-tabs="false" mat-align-tabs="start" [tabPanel]="panel" aria-label="Fleet pages">
      <a
        mat-tab-link
        routerLink="/fleet"
        routerLinkActive
        #buses="routerLinkActive"
        [routerLinkActiveOptions]="{ exact: true }"
        [active]="buses.isActive"
        >Buses</a
      >
      <a
        mat-tab-link
        routerLink="/fleet/service-day"
        routerLinkActive
        #day="routerLinkActive"
        queryParamsHandling="preserve"
        [active]="day.isActive"
        >Service day</a
      >
    </nav>
    <mat-tab-nav-panel #panel>
      <ng-content />
    </mat-tab-nav-panel>
  `,
  styles: `
    :host {
      display: block;
    }
    nav {
      margin-bottom: 16px;
    }
  `,
})
export class FleetTabs {}

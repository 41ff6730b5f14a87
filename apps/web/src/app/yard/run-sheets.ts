import { DomPortalOutlet, TemplatePortal } from '@angular/cdk/portal';
import {
  ChangeDetectionStrategy,
  Component,
  DOCUMENT,
  DestroyRef,
  ViewEncapsulation,
  afterNextRender,
  computed,
  inject,
  input,
  viewChild,
  ViewContainerRef,
  type TemplateRef,
} from '@angular/core';
import { ADVISORY, HIGH_VOLTAGE_WARNING, SAFETY_CAUTIONS } from './safety';
import { clock, day, moveBy, spansDays, type StepView } from './yard-format';
import type { ChargerView } from './yard-store';

/** Which run sheets to print: the whole depot, or one charger. */
export interface RunSheetChoice {
  charger: string | null;
  /** Whole depot: start each charger on a new page. */
  perPage: boolean;
}

/**
 * Printable run sheets: a table of steps per charger (time, bus, action, kWh, done, initials) under
 * the cautions. Kept out of sight on screen and moved to the end of <body>, so that a print shows
 * only them (the print rules below hide everything else while the Yard page is open).
 */
@Component({
  selector: 'ny-run-sheets',
  changeDetection: ChangeDetectionStrategy.OnPush,
  encapsulation: ViewEncapsulation.None,
  template: `
    <ng-template #printable>
      <div class="ny-run-sheets" [class.ny-rs-per-page]="choice().perPage || choice().charger !== null">
        @for (sheet of sheets(); track sheet.label; let first = $first) {
          <section class="ny-rs-charger" [class.ny-rs-break]="!first && choice().perPage">
            <header class="ny-rs-head">
              <h1>Run sheet: charger {{ sheet.label }}{{ sheet.maxKw ? ' (' + sheet.maxKw + ' kW)' : '' }}</h1>
              <p>
                {{ depotName() }} · {{ night() }} · plan version {{ version() }} · printed {{ printedAt() }} (depot
                time)
              </p>
            </header>
            @if (first || choice().perPage) {
              <div class="ny-rs-cautions">
                <p>
                  <strong>{{ warning }}</strong>
                </p>
                <ul>
                  @for (c of cautions; track c) {
                    <li>{{ c }}</li>
                  }
                </ul>
                <p>
                  <strong>{{ advisory }}</strong>
                </p>
              </div>
            }
            @if (sheet.outOfService) {
              <p class="ny-rs-out">Out of service{{ sheet.reason ? ': ' + sheet.reason : '' }}.</p>
            }
            <table>
              <thead>
                <tr>
                  <th scope="col">Time</th>
                  <th scope="col">Bus</th>
                  <th scope="col">Step</th>
                  <th scope="col">By</th>
                  <th scope="col" class="ny-rs-num">kWh</th>
                  <th scope="col">Done at</th>
                  <th scope="col" class="ny-rs-sign">Initials</th>
                </tr>
              </thead>
              <tbody>
                @for (row of sheet.rows; track row.key) {
                  <tr>
                    <td>{{ row.time }}</td>
                    <td>{{ row.bus }}</td>
                    <td>{{ row.action }}</td>
                    <td>{{ row.by }}</td>
                    <td class="ny-rs-num">{{ row.kwh }}</td>
                    <td>{{ row.done }}</td>
                    <td class="ny-rs-sign"></td>
                  </tr>
                } @empty {
                  <tr>
                    <td colspan="7">No bus is planned on this charger tonight.</td>
                  </tr>
                }
              </tbody>
            </table>
          </section>
        }
      </div>
    </ng-template>
  `,
  styles: `
    .ny-run-sheets {
      display: none;
    }

    @media print {
      @page {
        margin: 14mm 12mm;
      }
      html,
      body {
        height: auto !important;
        background: #fff !important;
        color: #000 !important;
      }
      body > :not(.ny-run-sheets-outlet) {
        display: none !important;
      }
      .ny-run-sheets {
        display: block;
        color: #000;
        background: #fff;
        font:
          11pt/1.35 Inter,
          system-ui,
          sans-serif;
      }
      .ny-rs-charger + .ny-rs-charger {
        margin-top: 10mm;
      }
      .ny-rs-charger.ny-rs-break {
        break-before: page;
        margin-top: 0;
      }
      .ny-rs-head h1 {
        margin: 0;
        font-size: 16pt;
      }
      .ny-rs-head p {
        margin: 1mm 0 3mm;
      }
      .ny-rs-cautions {
        margin-bottom: 4mm;
        padding: 2mm 3mm;
        border: 1.5pt solid #000;
        font-size: 9.5pt;
      }
      .ny-rs-cautions p,
      .ny-rs-cautions ul {
        margin: 0.5mm 0;
      }
      .ny-rs-cautions ul {
        padding-left: 5mm;
      }
      .ny-rs-out {
        font-weight: 700;
      }
      .ny-run-sheets table {
        width: 100%;
        border-collapse: collapse;
      }
      .ny-run-sheets th,
      .ny-run-sheets td {
        padding: 2mm 2mm;
        border: 0.75pt solid #000;
        text-align: left;
        vertical-align: top;
      }
      .ny-run-sheets thead {
        display: table-header-group;
      }
      .ny-run-sheets tr {
        break-inside: avoid;
      }
      .ny-run-sheets .ny-rs-num {
        text-align: right;
      }
      .ny-run-sheets .ny-rs-sign {
        width: 22%;
      }
    }
  `,
})
export class RunSheets {
  readonly chargers = input.required<readonly ChargerView[]>();
  readonly depotName = input.required<string>();
  readonly timezone = input.required<string>();
  readonly version = input.required<number>();
  readonly nightStart = input.required<number>();
  /** The night's end: a night longer than a day (a weekend's) names it too. */
  readonly nightEnd = input<number | null>(null);
  readonly now = input.required<number>();
  readonly choice = input<RunSheetChoice>({ charger: null, perPage: false });

  protected readonly warning = HIGH_VOLTAGE_WARNING;
  protected readonly cautions = SAFETY_CAUTIONS;
  protected readonly advisory = ADVISORY;

  private readonly template = viewChild.required<TemplateRef<unknown>>('printable');

  protected readonly night = computed(() => {
    const start = this.nightStart();
    const end = this.nightEnd();
    const to = end !== null && spansDays({ start, end }) ? ` to ${day(end, this.timezone())}` : '';
    return `night of ${day(start, this.timezone())}${to}`;
  });
  protected readonly printedAt = computed(
    () => `${day(this.now(), this.timezone())} ${clock(this.now(), this.timezone())}`,
  );

  protected readonly sheets = computed(() => {
    const only = this.choice().charger;
    return this.chargers()
      .filter((c) => only === null || c.label === only)
      .map((c) => ({
        label: c.label,
        maxKw: c.charger?.maxKw ?? null,
        outOfService: c.outOfService,
        reason: c.statusReason,
        rows: c.steps.map((s: StepView) => ({
          key: s.step.key,
          time: s.time,
          bus: s.step.bus,
          // The server's words for the step (an unplug forced by a report says where the bus goes).
          action: s.title,
          // Who makes the move: the driver on pulling in or out, or the yard crew.
          by: moveBy(s.step),
          kwh:
            s.step.action === 'connect'
              ? new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(s.step.kwh)
              : '',
          done: s.state === 'missed' ? 'Did not happen' : s.doneNote ? s.doneNote.replace(/^Done /, '') : '',
        })),
      }));
  });

  constructor() {
    const document = inject(DOCUMENT);
    const vcr = inject(ViewContainerRef);
    let outlet: DomPortalOutlet | null = null;
    let host: HTMLElement | null = null;
    afterNextRender(() => {
      host = document.createElement('div');
      host.className = 'ny-run-sheets-outlet';
      document.body.appendChild(host);
      outlet = new DomPortalOutlet(host);
      outlet.attach(new TemplatePortal(this.template(), vcr));
    });
    inject(DestroyRef).onDestroy(() => {
      outlet?.dispose();
      host?.remove();
    });
  }
}

import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import type { Cabinet, Charger } from '@nightyard/contracts';
import { injectIsPhone } from '../core/layout';
import { formatKw } from './depot-setup-format';

/** Power cabinets: the kW limit their chargers share. */
@Component({
  selector: 'ny-cabinet-panel',
  imports: [MatButtonModule, MatIconModule, MatTableModule],
  template: `
    <section class="panel" aria-labelledby="depot-cabinets-heading">
      <div class="panel-header">
        <h2 id="depot-cabinets-heading">Power cabinets</h2>
        @if (canEdit()) {
          <button mat-stroked-button type="button" (click)="add.emit()">
            <mat-icon>add</mat-icon>Add power cabinet
          </button>
        }
      </div>
      <p class="hint">Chargers on one power cabinet share its limit: plans keep their total under it.</p>
      @if (rows().length === 0) {
        <p class="empty">No power cabinets: every charger draws straight from the site service.</p>
      } @else if (phone()) {
        <ul class="cabinet-list" aria-label="Power cabinets">
          @for (r of rows(); track r.cabinet.id) {
            <li>
              <div class="main">
                <span class="label">{{ r.cabinet.label }}</span>
                <span class="meta">Shared limit {{ kw(r.cabinet.limitKw) }}</span>
                <span class="meta">{{
                  r.labels ? 'Chargers: ' + r.labels + ' (' + kw(r.sum) + ' together)' : 'No chargers yet'
                }}</span>
              </div>
              @if (canEdit()) {
                <div class="row-actions">
                  <button
                    mat-icon-button
                    type="button"
                    [attr.aria-label]="'Edit power cabinet ' + r.cabinet.label"
                    (click)="edit.emit(r.cabinet)"
                  >
                    <mat-icon>edit</mat-icon>
                  </button>
                  <button
                    mat-icon-button
                    type="button"
                    [attr.aria-label]="'Remove power cabinet ' + r.cabinet.label"
                    (click)="remove.emit(r.cabinet)"
                  >
                    <mat-icon>delete</mat-icon>
                  </button>
                </div>
              }
            </li>
          }
        </ul>
      } @else {
        <div class="table-scroll" role="region" aria-label="Power cabinets table" tabindex="0">
          <table mat-table [dataSource]="rows()" class="cabinets">
            <caption class="ny-visually-hidden">
              Power cabinets with their shared limit and chargers
            </caption>
            <ng-container matColumnDef="label">
              <th mat-header-cell *matHeaderCellDef scope="col">Cabinet</th>
              <td mat-cell *matCellDef="let r" class="label">{{ r.cabinet.label }}</td>
            </ng-container>
            <ng-container matColumnDef="limit">
              <th mat-header-cell *matHeaderCellDef scope="col" class="num">Shared limit</th>
              <td mat-cell *matCellDef="let r" class="num">{{ kw(r.cabinet.limitKw) }}</td>
            </ng-container>
            <ng-container matColumnDef="chargers">
              <th mat-header-cell *matHeaderCellDef scope="col">Chargers on it</th>
              <td mat-cell *matCellDef="let r">{{ r.labels || 'None yet' }}</td>
            </ng-container>
            <ng-container matColumnDef="sum">
              <th mat-header-cell *matHeaderCellDef scope="col" class="num">Their maxima add up to</th>
              <td mat-cell *matCellDef="let r" class="num">{{ kw(r.sum) }}</td>
            </ng-container>
            <ng-container matColumnDef="actions">
              <th mat-header-cell *matHeaderCellDef scope="col"><span class="ny-visually-hidden">Actions</span></th>
              <td mat-cell *matCellDef="let r" class="row-actions">
                <button
                  mat-icon-button
                  type="button"
                  [attr.aria-label]="'Edit power cabinet ' + r.cabinet.label"
                  (click)="edit.emit(r.cabinet)"
                >
                  <mat-icon>edit</mat-icon>
                </button>
                <button
                  mat-icon-button
                  type="button"
                  [attr.aria-label]="'Remove power cabinet ' + r.cabinet.label"
                  (click)="remove.emit(r.cabinet)"
                >
                  <mat-icon>delete</mat-icon>
                </button>
              </td>
            </ng-container>
            <tr mat-header-row *matHeaderRowDef="columns()"></tr>
            <tr mat-row *matRowDef="let r; columns: columns()"></tr>
          </table>
        </div>
      }
    </section>
  `,
  styleUrl: '../shared/panel.scss',
  styles: `
    .cabinets {
      width: 100%;
      min-width: 560px;
    }
    .label {
      font-weight: 600;
    }
    .row-actions {
      width: 96px;
      text-align: end;
      white-space: nowrap;
    }
    .cabinet-list {
      margin: 0;
      padding: 0;
      list-style: none;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-small);
    }
    .cabinet-list li {
      display: flex;
      align-items: flex-start;
      gap: 8px;
      padding: 10px 4px 10px 12px;
    }
    .cabinet-list li + li {
      border-top: 1px solid var(--mat-sys-outline-variant);
    }
    .cabinet-list .main {
      display: flex;
      flex: 1 1 auto;
      flex-direction: column;
      gap: 2px;
      min-width: 0;
    }
    .cabinet-list .meta {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-medium);
    }
    .cabinet-list .row-actions {
      width: auto;
      flex: none;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CabinetPanel {
  readonly cabinets = input.required<readonly Cabinet[]>();
  readonly chargers = input.required<readonly Charger[]>();
  readonly canEdit = input(false);
  readonly add = output<void>();
  readonly edit = output<Cabinet>();
  readonly remove = output<Cabinet>();

  protected readonly kw = formatKw;
  protected readonly phone = injectIsPhone();
  protected readonly columns = computed(() =>
    this.canEdit() ? ['label', 'limit', 'chargers', 'sum', 'actions'] : ['label', 'limit', 'chargers', 'sum'],
  );
  protected readonly rows = computed(() =>
    this.cabinets().map((cabinet) => {
      const on = this.chargers().filter((c) => c.cabinetId === cabinet.id);
      return { cabinet, labels: on.map((c) => c.label).join(', '), sum: on.reduce((s, c) => s + c.maxKw, 0) };
    }),
  );
}

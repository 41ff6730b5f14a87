import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { buildCsv, injectSaveCsv, type CsvTable } from './csv';

/**
 * "Export CSV" for one table: builds the file from the table's own data in the browser and saves
 * it. The accessible name says which table ("Export CSV of the nights").
 */
@Component({
  selector: 'ny-csv-export-button',
  imports: [MatButtonModule, MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <button mat-stroked-button type="button" [disabled]="!table().rows.length" (click)="save()">
      <mat-icon>download</mat-icon>Export CSV<span class="ny-visually-hidden"> of {{ what() }}</span>
    </button>
  `,
})
export class CsvExportButton {
  /** The table's rows and header. */
  readonly table = input.required<CsvTable>();
  /** The file's name, e.g. "costs-nights-2026-12.csv". */
  readonly fileName = input.required<string>();
  /** Which table, for the button's accessible name ("the nights"). */
  readonly what = input.required<string>();

  private readonly saveCsv = injectSaveCsv();

  protected save(): void {
    this.saveCsv(this.fileName(), buildCsv(this.table()));
  }
}

import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { User } from '@nightyard/contracts';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { PeopleApi } from './people-api';
import { DepotListStore } from '../depot-state/depot-list-store';
import { DepotPicker } from './depot-picker';
import { RoleCheckboxes } from './role-checkboxes';
import { chosenRoles, depotRules, roleGroup } from './role-form';

/** Edits one person's roles and depots. Closes with the updated user. */
@Component({
  selector: 'ny-roles-dialog',
  imports: [DepotPicker, MatButtonModule, MatDialogModule, MatProgressBarModule, ReactiveFormsModule, RoleCheckboxes],
  changeDetection: ChangeDetectionStrategy.OnPush,
  styleUrl: './people-dialog.scss',
  host: { class: 'ny-dense' },
  template: `
    <h2 mat-dialog-title>Roles and depots of {{ user.name }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="intro">The change applies the next time {{ user.name }} opens a page.</p>
        <ny-role-checkboxes
          [group]="form.controls.roles"
          [showError]="form.controls.roles.invalid && (submitted() || form.controls.roles.dirty)"
        />
        <ny-depot-picker
          [control]="form.controls.depotIds"
          [depots]="depots()"
          [single]="depotRules.single()"
          [admin]="depotRules.admin()"
          [problem]="depotRules.problem()"
        />
        <div aria-live="assertive" aria-atomic="true">
          @if (problem(); as p) {
            <p class="ny-form-error">{{ p }}</p>
          }
        </div>
        @if (busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Saving the roles and depots" />
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">Save</button>
      </mat-dialog-actions>
    </form>
  `,
})
export class RolesDialog {
  private readonly api = inject(PeopleApi);
  private readonly ref = inject<MatDialogRef<RolesDialog, User>>(MatDialogRef);
  protected readonly user = inject<User>(MAT_DIALOG_DATA);

  private readonly depotList = inject(DepotListStore);

  protected readonly form = new FormGroup({
    roles: roleGroup(this.user.roles),
    depotIds: new FormControl<string[]>([...this.user.depotIds], { nonNullable: true }),
  });
  protected readonly submitted = signal(false);
  protected readonly depots = this.depotList.depots;
  protected readonly depotRules = depotRules(this.form.controls.roles, this.form.controls.depotIds, this.submitted);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.submitted.set(true);
    this.problem.set(null);
    if (this.form.invalid || this.depotRules.problemNow()) return;
    this.busy.set(true);
    try {
      this.ref.close(
        await this.api.update(this.user.id, {
          roles: chosenRoles(this.form.controls.roles),
          depotIds: this.form.controls.depotIds.value,
        }),
      );
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyFieldErrors(this.form, p.fields);
      if (Object.keys(p.fields).length === 0) this.problem.set(p.message);
      else if (rest.length > 0) this.problem.set(rest.join(' '));
    } finally {
      this.busy.set(false);
    }
  }
}

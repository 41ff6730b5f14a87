import { ChangeDetectionStrategy, Component, ElementRef, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { User } from '@nightyard/contracts';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { PeopleApi } from './people-api';
import { DepotListStore } from '../depot-state/depot-list-store';
import { DepotPicker } from './depot-picker';
import { RoleCheckboxes } from './role-checkboxes';
import { chosenRoles, depotRules, roleGroup } from './role-form';

/** "Invite someone": name, e-mail, roles, depots. Closes with the invited user. */
@Component({
  selector: 'ny-invite-dialog',
  imports: [
    DepotPicker,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
    RoleCheckboxes,
  ],
  templateUrl: './invite-dialog.html',
  styleUrl: './people-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class InviteDialog {
  private readonly api = inject(PeopleApi);
  private readonly ref = inject<MatDialogRef<InviteDialog, User>>(MatDialogRef);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly depotList = inject(DepotListStore);

  protected readonly form = new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(120)] }),
    email: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.email] }),
    roles: roleGroup(),
    // The depot the inviter works on, to start from.
    depotIds: new FormControl<string[]>(this.depotList.current() ? [this.depotList.current()!.id] : [], {
      nonNullable: true,
    }),
  });
  protected readonly submitted = signal(false);
  protected readonly depots = this.depotList.depots;
  protected readonly depotRules = depotRules(this.form.controls.roles, this.form.controls.depotIds, this.submitted);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.submitted.set(true);
    this.problem.set(null);
    const depotProblem = this.depotRules.problemNow();
    if (this.form.invalid || depotProblem) {
      this.form.markAllAsTouched();
      queueMicrotask(() =>
        this.host.nativeElement
          .querySelector<HTMLElement>('input.ng-invalid, fieldset.ng-invalid input, ny-depot-picker.problem input')
          ?.focus(),
      );
      return;
    }
    const { name, email } = this.form.getRawValue();
    this.busy.set(true);
    try {
      const user = await this.api.invite({
        name: name.trim(),
        email: email.trim(),
        roles: chosenRoles(this.form.controls.roles),
        depotIds: this.form.controls.depotIds.value,
      });
      this.ref.close(user);
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyFieldErrors(this.form, p.fields);
      if (Object.keys(p.fields).length === 0) {
        this.problem.set(p.message);
      } else if (rest.length > 0) {
        this.problem.set(rest.join(' '));
      }
    } finally {
      this.busy.set(false);
    }
  }
}

import type { Signal } from '@angular/core';
import { FormControl, FormGroup, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { ROLES, depotAssignmentProblem, type Role } from '@nightyard/contracts';

export type RoleGroup = FormGroup<Record<Role, FormControl<boolean>>>;

function atLeastOneRole(group: AbstractControl): ValidationErrors | null {
  const value = group.value as Partial<Record<Role, boolean>>;
  return Object.values(value).some(Boolean) ? null : { noRole: true };
}

/** One checkbox per role, at least one ticked. */
export function roleGroup(initial: readonly Role[] = []): RoleGroup {
  const controls = Object.fromEntries(
    ROLES.map((r) => [r, new FormControl(initial.includes(r), { nonNullable: true })]),
  ) as Record<Role, FormControl<boolean>>;
  return new FormGroup(controls, { validators: atLeastOneRole });
}

export function chosenRoles(group: RoleGroup): Role[] {
  const value = group.getRawValue();
  return ROLES.filter((r) => value[r]);
}

/**
 * The depot choice of a person's form, following the roles ticked: whether only one depot may be
 * chosen (yard staff), whether they are an administrator, and the contract's message about the
 * choice (once `shown` says so) or the server's. Plain functions, read by the template on each
 * check (the form's events mark the dialog for one).
 */
export function depotRules(roles: RoleGroup, depotIds: FormControl<string[]>, shown: Signal<boolean>) {
  const chosen = () => chosenRoles(roles);
  const problemNow = () => depotAssignmentProblem(chosen(), depotIds.value);
  return {
    single: () => chosen().length > 0 && chosen().every((r) => r === 'yard'),
    admin: () => chosen().includes('admin'),
    /** The contract's rule for the roles and depots chosen now (null: fine). */
    problemNow,
    problem: () => (depotIds.getError('server') as string | undefined) ?? (shown() ? problemNow() : null),
  };
}

import { NgTemplateOutlet } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS, type User } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { toApiProblem } from '../core/api-error';
import { injectIsPhone } from '../core/layout';
import { VIEWER_TIME_ZONE } from '../core/depot-time-note';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SectionIntro } from '../sections/section-intro';
import { ConfirmDialog, type ConfirmData } from './confirm-dialog';
import { InviteDialog } from './invite-dialog';
import { PeopleApi } from './people-api';
import { STATUS_ICONS, STATUS_LABELS, formatWhen } from './people-format';
import { RolesDialog } from './roles-dialog';

export interface PersonRow {
  user: User;
  roleNames: string[];
  /** Where they work, by name ("Every depot" for an administrator, who sees them all). */
  depotNames: string[];
  statusLabel: string;
  statusIcon: string;
  lastSignIn: string;
  isMe: boolean;
}

/** A person's depots by name, in the list's order; administrators see every depot. */
export function depotNamesOf(user: User, names: ReadonlyMap<string, string>): string[] {
  if (user.roles.includes('admin')) return ['Every depot'];
  const known = [...names.entries()].filter(([id]) => user.depotIds.includes(id)).map(([, name]) => name);
  return known.length ? known : ['None'];
}

@Component({
  selector: 'ny-people-page',
  imports: [
    MatButtonModule,
    MatChipsModule,
    MatIconModule,
    MatMenuModule,
    MatProgressBarModule,
    MatTableModule,
    NgTemplateOutlet,
    RouterLink,
    SectionIntro,
  ],
  templateUrl: './people-page.html',
  styleUrl: './people-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class PeoplePage {
  private readonly api = inject(PeopleApi);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly auth = inject(AuthStore);
  private readonly depots = inject(DepotListStore);
  private readonly viewerZone = inject(VIEWER_TIME_ZONE);

  /** Phones get a list of people instead of the wide table. */
  protected readonly phone = injectIsPhone();
  protected readonly columns = ['name', 'email', 'roles', 'depots', 'status', 'lastSignIn', 'actions'];

  protected readonly users = signal<User[]>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  /** Table rows, sorted by name, with display text worked out once. */
  protected readonly rows = computed<PersonRow[]>(() => {
    // Times at the depot, as everywhere (the shell has loaded the depots).
    const zone = this.depots.current()?.timezone ?? this.viewerZone;
    const names = new Map(this.depots.depots().map((d) => [d.id, d.name]));
    return [...this.users()]
      .sort((a, b) => a.name.localeCompare(b.name))
      .map((user) => ({
        user,
        roleNames: user.roles.map((r) => ROLE_LABELS[r]),
        depotNames: depotNamesOf(user, names),
        statusLabel: STATUS_LABELS[user.status],
        statusIcon: STATUS_ICONS[user.status],
        lastSignIn: formatWhen(user.lastSignInAt, zone) ?? 'Never',
        isMe: user.id === this.auth.user()?.id,
      }));
  });

  constructor() {
    void this.depots.load();
    void this.load();
  }

  protected async load(): Promise<void> {
    this.loading.set(true);
    this.problem.set(null);
    try {
      this.users.set(await this.api.list());
    } catch (err) {
      this.problem.set(toApiProblem(err).message);
    } finally {
      this.loading.set(false);
    }
  }

  protected invite(): void {
    this.dialog
      .open<InviteDialog, void, User>(InviteDialog, { width: '560px', maxWidth: '95vw', autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((user) => {
        if (!user) return;
        this.users.update((list) => [...list.filter((u) => u.id !== user.id), user]);
        this.snackBar.open(`Invitation sent to ${user.email}`, 'OK');
      });
  }

  protected changeRoles(user: User): void {
    this.dialog
      .open<RolesDialog, User, User>(RolesDialog, { data: user, width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((updated) => {
        if (!updated) return;
        this.replace(updated);
        this.snackBar.open(`Roles and depots of ${updated.name} saved`, 'OK');
      });
  }

  protected setActive(user: User, active: boolean): void {
    const data: ConfirmData = active
      ? {
          title: `Reactivate ${user.name}?`,
          message: `${user.name} can sign in again with the same roles.`,
          confirm: 'Reactivate',
        }
      : {
          title: `Deactivate ${user.name}?`,
          message: `${user.name} can no longer sign in, and any session they have ends. You can reactivate them later.`,
          confirm: 'Deactivate',
        };
    this.dialog
      .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '440px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (confirmed) void this.applyActive(user, active);
      });
  }

  private async applyActive(user: User, active: boolean): Promise<void> {
    try {
      const updated = await this.api.update(user.id, { active });
      this.replace(updated);
      this.snackBar.open(`${updated.name} is ${active ? 'reactivated' : 'deactivated'}`, 'OK');
    } catch (err) {
      this.snackBar.open(toApiProblem(err).message, 'OK', { duration: 10_000, politeness: 'assertive' });
    }
  }

  private replace(updated: User): void {
    this.users.update((list) => list.map((u) => (u.id === updated.id ? updated : u)));
  }
}

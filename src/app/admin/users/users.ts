import { BreakpointObserver } from '@angular/cdk/layout';
import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuContent, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { firstValueFrom, map } from 'rxjs';
import type { FarmSummary, UserStatus, UserSummary } from '../../../../shared/api-types';
import { ROLE_LABELS } from '../../../../shared/roles';
import { errorMessage } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { ConfirmDialog, type ConfirmDialogData } from '../../shared/confirm-dialog';
import { UserDialog, type UserDialogData } from './user-dialog';
import { UsersApi } from './users-api';
import { LoadProblem } from '../../shared/load-problem';
import { StatusPill, type PillTone } from '../../shared/status-pill';

interface StatusView {
  label: string;
  icon: string;
  tone: PillTone;
}

const STATUS: Record<UserStatus, StatusView> = {
  active: { label: 'Active', icon: 'check_circle', tone: 'success' },
  invited: { label: 'Invited', icon: 'schedule_send', tone: 'pending' },
  deactivated: { label: 'Deactivated', icon: 'block', tone: 'neutral' },
};

/** A table row: the account plus the words and icon the table shows for it. */
interface UserRow extends UserSummary {
  roleLabel: string;
  statusView: StatusView;
}

/** `/admin/users`: who has an account, invitations, roles, deactivation and reset links. */
@Component({
  selector: 'np-users',
  imports: [
    DatePipe,
    MatButton,
    MatIconButton,
    MatIcon,
    StatusPill,
    MatFormField,
    MatLabel,
    MatPrefix,
    MatInput,
    MatMenu,
    MatMenuContent,
    MatMenuItem,
    MatMenuTrigger,
    MatProgressBar,
    MatTableModule,
    LoadProblem,
  ],
  templateUrl: './users.html',
  styleUrl: './users.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Users {
  // services
  readonly #api = inject(UsersApi);
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);

  protected readonly users = httpResource<UserSummary[]>(() => '/api/users');
  protected readonly farms = httpResource<FarmSummary[]>(() => '/api/farms');
  protected readonly rows = computed<UserRow[]>(() =>
    this.users.hasValue()
      ? [...this.users.value()]
          .sort((a, b) => a.name.localeCompare(b.name))
          .map((user) => ({ ...user, roleLabel: ROLE_LABELS[user.role], statusView: STATUS[user.status] }))
      : [],
  );
  protected readonly search = signal('');
  /** The rows matching the search text in name, e-mail, role, farm or status. */
  protected readonly shownRows = computed(() => {
    const words = this.search().trim().toLowerCase().split(/\s+/).filter(Boolean);
    if (words.length === 0) return this.rows();
    return this.rows().filter((u) => {
      const haystack = [u.name, u.email, u.roleLabel, u.farmName ?? '', u.statusView.label].join(' ').toLowerCase();
      return words.every((word) => haystack.includes(word));
    });
  });
  protected readonly problem = computed(() => (this.users.error() ? errorMessage(this.users.error()) : null));
  protected readonly counts = computed(() => {
    const rows = this.rows();
    return {
      active: rows.filter((u) => u.status === 'active').length,
      invited: rows.filter((u) => u.status === 'invited').length,
      deactivated: rows.filter((u) => u.status === 'deactivated').length,
    };
  });

  protected readonly myId = computed(() => this.#auth.user()?.id ?? null);

  readonly #wide = toSignal(
    inject(BreakpointObserver)
      .observe('(min-width: 840px)')
      .pipe(map((s) => s.matches)),
    { initialValue: true },
  );
  protected readonly columns = computed(() =>
    this.#wide() ? ['name', 'role', 'farm', 'status', 'lastSignIn', 'actions'] : ['name', 'status', 'actions'],
  );

  protected inviteUser(): void {
    this.#openUserDialog({ farms: this.#farmList() }, (saved) => `Invitation sent to ${saved.email}.`);
  }

  protected editUser(user: UserSummary): void {
    this.#openUserDialog({ user, farms: this.#farmList() }, (saved) => `${saved.name} saved.`);
  }

  protected async setActive(user: UserSummary, active: boolean): Promise<void> {
    const data: ConfirmDialogData = active
      ? {
          title: `Reactivate ${user.name}?`,
          message: `${user.name} will be able to sign in again as ${ROLE_LABELS[user.role].toLowerCase()}.`,
          confirmLabel: 'Reactivate',
        }
      : {
          title: `Deactivate ${user.name}?`,
          message: `${user.name} will be signed out and can no longer sign in. Their records and history stay; you can reactivate the account later.`,
          confirmLabel: 'Deactivate',
          destructive: true,
        };
    const confirmed = await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed());
    if (!confirmed) return;
    try {
      await this.#api.update(user.id, { active });
      this.#snackBar.open(active ? `${user.name} can sign in again.` : `${user.name} is deactivated.`, 'OK');
      this.users.reload();
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  /** A new link for someone who has not accepted yet; the earlier link stops working once it is sent. */
  protected async resendInvitation(user: UserSummary): Promise<void> {
    try {
      const { message } = await this.#api.resendInvitation(user.id);
      this.#snackBar.open(message, 'OK');
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  protected async sendReset(user: UserSummary): Promise<void> {
    try {
      await this.#api.sendPasswordReset(user.id);
      this.#snackBar.open(`A link to choose a new password is on its way to ${user.email}.`, 'OK');
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }

  #farmList(): FarmSummary[] {
    return this.farms.hasValue() ? this.farms.value() : [];
  }

  #openUserDialog(data: UserDialogData, done: (saved: UserSummary) => string): void {
    this.#dialog
      .open<UserDialog, UserDialogData, UserSummary>(UserDialog, { data, autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.#snackBar.open(done(saved), 'OK');
        this.users.reload();
        this.farms.reload();
      });
  }
}

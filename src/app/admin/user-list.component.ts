import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { map } from 'rxjs';
import { MatButtonModule } from '@angular/material/button';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import * as z from 'zod';
import { ROLES, type Role } from '../../../shared/roles.js';
import { userActionResponseSchema } from '../../../shared/api/user-admin.js';
import { type UserSummary, userListResponseSchema, userSummarySchema } from '../../../shared/api/users.js';
import { ApiService } from '../core/api.service';
import { SessionService } from '../core/session.service';
import { ROLE_LABELS } from '../shell/role-label';
import { PANEL_STYLES } from './panel.styles';
import { UserCreateFormComponent } from './user-create-form.component';

/** The accounts table of /admin: role, enable/disable and password reset per account, and a create/invite form. */
@Component({
  selector: 'ns-user-list',
  imports: [DatePipe, MatButtonModule, MatProgressBarModule, MatSelectModule, MatTableModule, UserCreateFormComponent],
  template: `
    <section class="panel" aria-labelledby="accounts-title">
      <header class="panel-head">
        <h2 id="accounts-title">Accounts</h2>
        @if (users.hasValue()) {
          <span class="count num">{{ users.value().length }}</span>
        }
      </header>
      @if (users.isLoading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading accounts" />
      }
      @if (users.error()) {
        <p class="load-error" role="alert">The account list could not be loaded. Reload the page to try again.</p>
      }
      @if (users.hasValue()) {
        <table mat-table [dataSource]="users.value()" class="accounts">
          <ng-container matColumnDef="displayName">
            <th mat-header-cell *matHeaderCellDef>Name</th>
            <td mat-cell *matCellDef="let u">{{ u.displayName }}</td>
          </ng-container>
          <ng-container matColumnDef="email">
            <th mat-header-cell *matHeaderCellDef>E-mail</th>
            <td mat-cell *matCellDef="let u" class="mono">{{ u.email }}</td>
          </ng-container>
          <ng-container matColumnDef="role">
            <th mat-header-cell *matHeaderCellDef>Role</th>
            <td mat-cell *matCellDef="let u">
              <mat-select class="role" [value]="u.role" (selectionChange)="setRole(u, $event.value)" [aria-label]="'Role of ' + u.email">
                @for (r of roles; track r) {
                  <mat-option [value]="r">{{ labels[r] }}</mat-option>
                }
              </mat-select>
            </td>
          </ng-container>
          <ng-container matColumnDef="status">
            <th mat-header-cell *matHeaderCellDef>Status</th>
            <td mat-cell *matCellDef="let u">
              <span class="status" [class.off]="u.disabled">{{ u.disabled ? 'Disabled' : 'Active' }}</span>
            </td>
          </ng-container>
          <ng-container matColumnDef="createdAt">
            <th mat-header-cell *matHeaderCellDef>Created (UTC)</th>
            <td mat-cell *matCellDef="let u" class="num">{{ u.createdAt | date: 'yyyy-MM-dd HH:mm' : 'UTC' }}</td>
          </ng-container>
          <ng-container matColumnDef="actions">
            <th mat-header-cell *matHeaderCellDef><span class="cdk-visually-hidden">Actions</span></th>
            <td mat-cell *matCellDef="let u" class="actions">
              <button mat-button type="button" (click)="setDisabled(u, !u.disabled)" [disabled]="u.id === me()">{{ u.disabled ? 'Enable' : 'Disable' }}</button>
              <button mat-button type="button" (click)="resetPassword(u)">Mail reset link</button>
            </td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
      }
      @if (notice()) {
        <p class="notice" role="status">{{ notice() }}</p>
      }
      <div class="panel-body">
        <h3>Add someone</h3>
        <ns-user-create-form (created)="users.reload()" />
      </div>
    </section>
  `,
  styles: `
    ${PANEL_STYLES}
    .count {
      padding: 0 8px;
      border-radius: 10px;
      font-size: 12px;
      line-height: 20px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    .accounts { width: 100%; }
    .role { width: 130px; }
    .actions { white-space: nowrap; text-align: right; }
    .load-error { margin: 0; padding: 16px 20px; color: var(--mat-sys-error); }
    .notice { margin: 0; padding: 12px 20px; }
    h3 { font: var(--mat-sys-title-small); margin: 16px 0 8px; }
    .status::before {
      content: '';
      display: inline-block;
      width: 8px;
      height: 8px;
      margin-right: 8px;
      border-radius: 50%;
      background: var(--mat-sys-primary);
    }
    .status.off::before { background: var(--mat-sys-outline); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserListComponent {
  private readonly api = inject(ApiService);
  private readonly session = inject(SessionService);

  protected readonly columns = ['displayName', 'email', 'role', 'status', 'createdAt', 'actions'];
  protected readonly roles = ROLES;
  protected readonly labels = ROLE_LABELS;
  protected readonly notice = signal('');
  protected readonly me = () => this.session.user()?.id;
  protected readonly users = rxResource({
    stream: () => this.api.get('/api/users', userListResponseSchema).pipe(map((body) => body.users)),
  });

  protected setRole(user: UserSummary, role: Role): void {
    this.update(user, { role }, `${user.email} is now ${ROLE_LABELS[role]}.`);
  }

  protected setDisabled(user: UserSummary, disabled: boolean): void {
    this.update(user, { disabled }, `${user.email} is ${disabled ? 'disabled; their sessions and API tokens stopped working' : 'enabled again'}.`);
  }

  protected resetPassword(user: UserSummary): void {
    this.api.post(`/api/users/${user.id}/reset-password`, {}, userActionResponseSchema).subscribe((o) =>
      this.notice.set(o.mailed ? `A one-time reset link was mailed to ${user.email} (see the Outbox).` : `Mail failed; pass this link on by hand: ${o.link ?? ''}`),
    );
  }

  private update(user: UserSummary, patch: object, done: string): void {
    this.api.patch(`/api/users/${user.id}`, patch, z.object({ user: userSummarySchema })).subscribe({
      next: () => {
        this.notice.set(done);
        this.users.reload();
      },
      // the server's reason (e.g. the last admin) is shown by the error interceptor; put the row back
      error: () => this.users.reload(),
    });
  }
}

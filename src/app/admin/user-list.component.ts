import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { map } from 'rxjs';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { type UserSummary, userListResponseSchema } from '../../../shared/api/users.js';
import { ApiService } from '../core/api.service';
import { ROLE_LABELS } from '../shell/role-label';

/** The accounts table of /admin (GET /api/users, admin only). */
@Component({
  selector: 'ns-user-list',
  imports: [DatePipe, MatProgressBarModule, MatTableModule],
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
            <td mat-cell *matCellDef="let u">{{ roleLabel(u) }}</td>
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
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
      }
    </section>
  `,
  styles: `
    .panel {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 16px;
      overflow: hidden;
      background: var(--mat-sys-surface-container-lowest);
    }
    .panel-head {
      display: flex;
      align-items: center;
      gap: 10px;
      padding: 16px 20px;
    }
    h2 {
      margin: 0;
      font: var(--mat-sys-title-medium);
    }
    .count {
      padding: 0 8px;
      border-radius: 10px;
      font-size: 12px;
      line-height: 20px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
    }
    .accounts {
      width: 100%;
    }
    .load-error {
      margin: 0;
      padding: 16px 20px;
      color: var(--mat-sys-error);
    }
    .status::before {
      content: '';
      display: inline-block;
      width: 8px;
      height: 8px;
      margin-right: 8px;
      border-radius: 50%;
      background: var(--mat-sys-primary);
    }
    .status.off::before {
      background: var(--mat-sys-outline);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserListComponent {
  private readonly api = inject(ApiService);

  protected readonly columns = ['displayName', 'email', 'role', 'status', 'createdAt'];
  protected readonly users = rxResource({
    stream: () => this.api.get('/api/users', userListResponseSchema).pipe(map((body) => body.users)),
  });

  protected roleLabel(user: UserSummary): string {
    return ROLE_LABELS[user.role];
  }
}

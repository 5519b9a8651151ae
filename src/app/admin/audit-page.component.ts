import { DatePipe, JsonPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { auditListResponseSchema } from '../../../shared/api/audit.js';
import { ApiService } from '../core/api.service';
import { SessionService } from '../core/session.service';
import { PageHeaderComponent } from '../ui/page-header.component';
import { AdminTabsComponent } from './admin-tabs.component';
import { PANEL_STYLES } from './panel.styles';

type Filters = Record<'action' | 'actor' | 'target' | 'from' | 'to', string>;

/** /audit (operations and admins): who did what and when, filterable, with CSV export. */
@Component({
  selector: 'ns-audit-page',
  imports: [DatePipe, JsonPipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatProgressBarModule, MatTableModule, PageHeaderComponent, AdminTabsComponent],
  template: `
    <ns-page-header heading="Audit log" summary="Sign-ins, account and setting changes, uploads, registrations and every queue action.">
      <a mat-stroked-button [href]="csvHref()" download>Export CSV</a>
    </ns-page-header>
    @if (isAdmin()) {
      <ns-admin-tabs />
    }
    <section class="panel">
      <form class="panel-body filters" [formGroup]="form" (ngSubmit)="apply()">
        <mat-form-field><mat-label>Action starts with</mat-label><input matInput formControlName="action" placeholder="job." /></mat-form-field>
        <mat-form-field><mat-label>Actor contains</mat-label><input matInput formControlName="actor" placeholder="e-mail or node" /></mat-form-field>
        <mat-form-field><mat-label>Target</mat-label><input matInput formControlName="target" placeholder="job:42 or job:" /></mat-form-field>
        <mat-form-field><mat-label>From (UTC)</mat-label><input matInput type="datetime-local" formControlName="from" /></mat-form-field>
        <mat-form-field><mat-label>To (UTC)</mat-label><input matInput type="datetime-local" formControlName="to" /></mat-form-field>
        <button mat-flat-button type="submit">Filter</button>
      </form>
      @if (page.isLoading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the audit log" />
      }
      @if (page.hasValue()) {
        <table mat-table [dataSource]="page.value().entries">
          <ng-container matColumnDef="at">
            <th mat-header-cell *matHeaderCellDef>When (UTC)</th>
            <td mat-cell *matCellDef="let e" class="num">{{ e.at | date: 'yyyy-MM-dd HH:mm:ss' : 'UTC' }}</td>
          </ng-container>
          <ng-container matColumnDef="actor">
            <th mat-header-cell *matHeaderCellDef>Who</th>
            <td mat-cell *matCellDef="let e" class="mono">{{ e.actor }}</td>
          </ng-container>
          <ng-container matColumnDef="action">
            <th mat-header-cell *matHeaderCellDef>Action</th>
            <td mat-cell *matCellDef="let e">{{ e.action }}</td>
          </ng-container>
          <ng-container matColumnDef="target">
            <th mat-header-cell *matHeaderCellDef>Target</th>
            <td mat-cell *matCellDef="let e" class="mono">{{ e.target }}</td>
          </ng-container>
          <ng-container matColumnDef="change">
            <th mat-header-cell *matHeaderCellDef>Before → after</th>
            <td mat-cell *matCellDef="let e" class="mono change">
              @if (e.before !== null) { {{ e.before | json }} → }
              @if (e.after !== null) { {{ e.after | json }} }
            </td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
        <div class="panel-body pager">
          <button mat-button type="button" [disabled]="!cursor().length" (click)="newer()">Newer</button>
          <button mat-button type="button" [disabled]="page.value().nextBefore === null" (click)="older(page.value().nextBefore)">Older</button>
        </div>
      }
    </section>
  `,
  styles: `
    ${PANEL_STYLES}
    .filters { display: flex; gap: 12px; flex-wrap: wrap; align-items: baseline; padding-top: 16px; }
    .change { max-width: 420px; overflow-wrap: anywhere; }
    .pager { display: flex; justify-content: flex-end; gap: 8px; padding-top: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuditPageComponent {
  private readonly api = inject(ApiService);
  private readonly session = inject(SessionService);
  protected readonly isAdmin = computed(() => this.session.hasRole('admin'));
  protected readonly columns = ['at', 'actor', 'action', 'target', 'change'];
  protected readonly form = new FormGroup({
    action: new FormControl('', { nonNullable: true }),
    actor: new FormControl('', { nonNullable: true }),
    target: new FormControl('', { nonNullable: true }),
    from: new FormControl('', { nonNullable: true }),
    to: new FormControl('', { nonNullable: true }),
  });
  private readonly filters = signal<Filters>({ action: '', actor: '', target: '', from: '', to: '' });
  /** Ids that started the pages already seen (for "Newer"). */
  protected readonly cursor = signal<number[]>([]);
  private readonly before = signal<number | null>(null);
  protected readonly query = computed(() => {
    const f = this.filters();
    const q: Record<string, string> = { limit: '100' };
    for (const [k, v] of Object.entries(f)) if (v) q[k] = k === 'from' || k === 'to' ? (v.length === 16 ? `${v}:00Z` : `${v}Z`) : v;
    const b = this.before();
    if (b !== null) q['before'] = String(b);
    return q;
  });
  protected readonly page = rxResource({ params: () => this.query(), stream: ({ params }) => this.api.get('/api/audit', auditListResponseSchema, { params }) });
  protected readonly csvHref = computed(() => {
    const { before: _b, limit: _l, ...rest } = this.query();
    return `/api/audit/export.csv?${new URLSearchParams(rest).toString()}`;
  });

  protected apply(): void {
    this.cursor.set([]);
    this.before.set(null);
    this.filters.set(this.form.getRawValue());
  }

  protected older(nextBefore: number | null): void {
    if (nextBefore === null) return;
    this.cursor.update((c) => [...c, this.before() ?? 0]);
    this.before.set(nextBefore);
  }

  protected newer(): void {
    const c = [...this.cursor()];
    const prev = c.pop() ?? 0;
    this.cursor.set(c);
    this.before.set(prev === 0 ? null : prev);
  }
}

import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, type FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { map } from 'rxjs';
import { createdTokenSchema, TOKEN_MAX_DAYS, tokenListResponseSchema, type TokenScope } from '../../../shared/api/tokens.js';
import { PANEL_STYLES } from '../admin/panel.styles';
import { ApiService } from '../core/api.service';

/** Your API tokens: create (the secret is shown once), list, revoke. */
@Component({
  selector: 'ns-token-list',
  imports: [DatePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatTableModule],
  template: `
    <section class="panel" aria-labelledby="tokens-title">
      <header class="panel-head"><h2 id="tokens-title">API tokens</h2></header>
      <div class="panel-body">
        <p class="hint">
          For scripts: send a token as <span class="mono">Authorization: Bearer nsk_…</span>. "Read" may only look; "submit" may also upload and queue jobs.
          No token can change accounts or settings. See the API page for every endpoint.
        </p>
        <form class="row" [formGroup]="form" #fd="ngForm" (ngSubmit)="create(fd)">
          <mat-form-field><mat-label>Where it is used</mat-label><input matInput formControlName="name" placeholder="survey laptop script" /></mat-form-field>
          <mat-form-field>
            <mat-label>Scope</mat-label>
            <mat-select formControlName="scope">
              <mat-option value="read">Read</mat-option>
              <mat-option value="submit">Submit</mat-option>
            </mat-select>
          </mat-form-field>
          <mat-form-field><mat-label>Valid for (days)</mat-label><input matInput type="number" min="1" [max]="maxDays" formControlName="expiresInDays" /></mat-form-field>
          <button mat-flat-button type="submit" [disabled]="form.invalid">Create token</button>
        </form>
        @if (secret(); as s) {
          <div class="secret" role="status">
            <p>Copy this token now: it is not shown again.</p>
            <code class="mono">{{ s }}</code>
            <button mat-button type="button" (click)="copy(s)">Copy</button>
          </div>
        }
      </div>
      @if (tokens.hasValue() && tokens.value().length) {
        <table mat-table [dataSource]="tokens.value()">
          <ng-container matColumnDef="name">
            <th mat-header-cell *matHeaderCellDef>Name</th>
            <td mat-cell *matCellDef="let t">{{ t.name }} <span class="mono hint">{{ t.prefix }}…</span></td>
          </ng-container>
          <ng-container matColumnDef="scope">
            <th mat-header-cell *matHeaderCellDef>Scope</th>
            <td mat-cell *matCellDef="let t">{{ t.scope }}</td>
          </ng-container>
          <ng-container matColumnDef="expiresAt">
            <th mat-header-cell *matHeaderCellDef>Expires (UTC)</th>
            <td mat-cell *matCellDef="let t" class="num">{{ t.expiresAt | date: 'yyyy-MM-dd' : 'UTC' }}</td>
          </ng-container>
          <ng-container matColumnDef="lastUsedAt">
            <th mat-header-cell *matHeaderCellDef>Last used</th>
            <td mat-cell *matCellDef="let t" class="num">{{ t.lastUsedAt ? (t.lastUsedAt | date: 'yyyy-MM-dd HH:mm' : 'UTC') : 'never' }}</td>
          </ng-container>
          <ng-container matColumnDef="status">
            <th mat-header-cell *matHeaderCellDef>Status</th>
            <td mat-cell *matCellDef="let t">
              {{ t.status }}
              @if (t.status === 'active') {
                <button mat-button type="button" (click)="revoke(t.id)">Revoke</button>
              }
            </td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
      }
    </section>
  `,
  styles: `
    ${PANEL_STYLES}
    .secret {
      padding: 12px 16px;
      border-radius: 12px;
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
      word-break: break-all;
    }
    .secret p { margin: 0 0 6px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TokenListComponent {
  private readonly api = inject(ApiService);
  protected readonly maxDays = TOKEN_MAX_DAYS;
  protected readonly columns = ['name', 'scope', 'expiresAt', 'lastUsedAt', 'status'];
  protected readonly secret = signal<string | null>(null);
  protected readonly form = new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(100)] }),
    scope: new FormControl<TokenScope>('read', { nonNullable: true }),
    expiresInDays: new FormControl(30, { nonNullable: true, validators: [Validators.required, Validators.min(1), Validators.max(TOKEN_MAX_DAYS)] }),
  });
  protected readonly tokens = rxResource({ stream: () => this.api.get('/api/tokens', tokenListResponseSchema).pipe(map((b) => b.tokens)) });

  protected create(fd: FormGroupDirective): void {
    const v = this.form.getRawValue();
    this.api.post('/api/tokens', v, createdTokenSchema).subscribe((c) => {
      this.secret.set(c.secret);
      // resetForm also clears "submitted", so the emptied name field is not shown as an error
      fd.resetForm({ ...v, name: '' });
      this.tokens.reload();
    });
  }

  protected revoke(id: number): void {
    this.api.delete(`/api/tokens/${id}`).subscribe(() => this.tokens.reload());
  }

  protected copy(text: string): void {
    void navigator.clipboard?.writeText(text);
  }
}

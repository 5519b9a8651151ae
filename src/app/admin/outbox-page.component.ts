import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import * as z from 'zod';
import { outboxResponseSchema } from '../../../shared/api/outbox.js';
import { ApiService } from '../core/api.service';
import { PageHeaderComponent } from '../ui/page-header.component';
import { AdminTabsComponent } from './admin-tabs.component';
import { PANEL_STYLES } from './panel.styles';

const digestSchema = z.object({ recipients: z.number(), jobs: z.number(), since: z.string(), until: z.string() });

/** /admin/outbox: messages the built-in SMTP receiver holds, and the mailer's delivery log. */
@Component({
  selector: 'ns-outbox-page',
  imports: [DatePipe, MatButtonModule, MatExpansionModule, MatProgressBarModule, MatTableModule, PageHeaderComponent, AdminTabsComponent],
  template: `
    <ns-page-header heading="Admin" summary="Mail Nullsmith sent: job outcomes, digests, invitations and reset links.">
      <button mat-stroked-button type="button" (click)="outbox.reload()">Refresh</button>
      <button mat-flat-button type="button" (click)="digest()">Send the digest now</button>
    </ns-page-header>
    <ns-admin-tabs />
    @if (note()) {
      <p role="status">{{ note() }}</p>
    }
    @if (outbox.isLoading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the outbox" />
    }
    @if (outbox.hasValue()) {
      <section class="panel" aria-labelledby="received-title">
        <header class="panel-head">
          <h2 id="received-title">Received messages</h2>
          <span class="hint">{{ outbox.value().mode === 'local' ? 'Built-in receiver on this machine: nothing leaves it.' : 'Sent through ' + outbox.value().mode + '; only the delivery log is kept.' }}</span>
        </header>
        <div class="panel-body">
          <mat-accordion>
            @for (m of outbox.value().messages; track m.id) {
              <mat-expansion-panel>
                <mat-expansion-panel-header>
                  <mat-panel-title>{{ m.subject || '(no subject)' }}</mat-panel-title>
                  <mat-panel-description class="mono">{{ m.envelopeTo.join(', ') }} · {{ m.receivedAt | date: 'yyyy-MM-dd HH:mm:ss' : 'UTC' }} UTC</mat-panel-description>
                </mat-expansion-panel-header>
                <pre class="body">{{ m.textBody }}</pre>
                <a mat-button [href]="'/api/outbox/' + m.id + '/raw'">Download as .eml</a>
              </mat-expansion-panel>
            } @empty {
              <p class="hint">No messages yet. They appear when a job ends, when someone is invited, or when a digest goes out.</p>
            }
          </mat-accordion>
        </div>
      </section>
      <section class="panel" aria-labelledby="log-title">
        <header class="panel-head"><h2 id="log-title">Delivery log</h2></header>
        <table mat-table [dataSource]="outbox.value().sends">
          <ng-container matColumnDef="createdAt">
            <th mat-header-cell *matHeaderCellDef>Queued (UTC)</th>
            <td mat-cell *matCellDef="let s" class="num">{{ s.createdAt | date: 'yyyy-MM-dd HH:mm:ss' : 'UTC' }}</td>
          </ng-container>
          <ng-container matColumnDef="kind">
            <th mat-header-cell *matHeaderCellDef>Kind</th>
            <td mat-cell *matCellDef="let s">{{ s.kind }}</td>
          </ng-container>
          <ng-container matColumnDef="to">
            <th mat-header-cell *matHeaderCellDef>To</th>
            <td mat-cell *matCellDef="let s" class="mono">{{ s.toAddresses.join(', ') }}</td>
          </ng-container>
          <ng-container matColumnDef="subject">
            <th mat-header-cell *matHeaderCellDef>Subject</th>
            <td mat-cell *matCellDef="let s">{{ s.subject }}</td>
          </ng-container>
          <ng-container matColumnDef="state">
            <th mat-header-cell *matHeaderCellDef>Outcome</th>
            <td mat-cell *matCellDef="let s" [class.failed]="s.state === 'failed'">
              {{ s.state }} after {{ s.attempts }} attempt(s)
              @if (s.lastError) {
                <div class="hint">{{ s.lastError }}</div>
              }
            </td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
      </section>
    }
  `,
  styles: `
    ${PANEL_STYLES}
    .body { white-space: pre-wrap; font-family: 'Roboto Mono', monospace; font-size: 13px; margin: 0 0 8px; }
    .failed { color: var(--mat-sys-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutboxPageComponent {
  private readonly api = inject(ApiService);
  protected readonly columns = ['createdAt', 'kind', 'to', 'subject', 'state'];
  protected readonly note = signal('');
  protected readonly outbox = rxResource({ stream: () => this.api.get('/api/outbox', outboxResponseSchema, { params: { limit: 100 } }) });

  protected digest(): void {
    this.api.post('/api/outbox/digest', {}, digestSchema).subscribe((r) => {
      this.note.set(`Digest covering ${r.since} to ${r.until}: ${r.jobs} job(s), sent to ${r.recipients} person(s) who asked for it.`);
      this.outbox.reload();
    });
  }
}

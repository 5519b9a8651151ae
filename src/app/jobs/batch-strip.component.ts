import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { firstValueFrom } from 'rxjs';
import * as z from 'zod';
import { cancelBatchResponseSchema, jobBatchSchema, type JobBatchDto } from '../../../shared/api/job-batches.js';
import { JOB_STATES, isFinalJobState, type JobState } from '../../../shared/api/jobs.js';
import { ApiService } from '../core/api.service';
import { SessionService } from '../core/session.service';
import { ConfirmDialogComponent, type ConfirmData } from './confirm-dialog.component';
import { STATE_LOOK } from './job-format';

const batchAnswerSchema = z.object({ batch: jobBatchSchema });

/**
 * The strip above the jobs table while it shows one batch: the batch's name and selection, how
 * many of its jobs are in each state, window progress over all of them, and (for its owner or
 * the operations role) one action that cancels every job of the batch not yet ended.
 */
@Component({
  selector: 'ns-batch-strip',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule],
  template: `
    <section class="batch" aria-label="Batch" data-testid="batch-strip">
      <mat-icon aria-hidden="true">layers</mat-icon>
      <div class="what">
        <b>Batch {{ batchId() }}</b>
        @if (batch(); as b) {
          <span> · {{ b.name }} · {{ b.recordingCount }} recording{{ b.recordingCount === 1 ? '' : 's' }}</span>
          @if (b.folder !== null) {
            <span class="muted"> · folder “{{ b.folder || '(root)' }}”, {{ b.pattern }}{{ b.recursive ? ', with sub-folders' : '' }}</span>
          }
          <div class="counts num">
            @for (s of states; track s) {
              @if (b.counts?.[s]; as n) {
                <span>{{ look[s].label }} {{ n }}</span>
              }
            }
            <span class="muted">· windows {{ b.windowsDone ?? 0 }}/{{ b.totalWindows ?? 0 }}</span>
          </div>
          <mat-progress-bar mode="determinate" [value]="percent()" />
        }
      </div>
      @if (canCancel()) {
        <button mat-stroked-button type="button" (click)="cancelRest()" data-testid="cancel-batch"><mat-icon>stop_circle</mat-icon>Cancel unfinished jobs</button>
      }
      <button mat-button type="button" (click)="closed.emit()" data-testid="clear-batch"><mat-icon>close</mat-icon>All jobs</button>
    </section>
  `,
  styles: `
    .batch { display: flex; align-items: center; gap: 12px; flex-wrap: wrap; padding: 10px 14px; margin-bottom: 12px; border-radius: 12px; background: var(--mat-sys-secondary-container); color: var(--mat-sys-on-secondary-container); }
    .what { flex: 1; min-width: 240px; }
    .counts { display: flex; gap: 10px; flex-wrap: wrap; font: var(--mat-sys-label-medium); margin: 4px 0; }
    .muted { opacity: 0.8; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchStripComponent {
  private readonly api = inject(ApiService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly session = inject(SessionService);

  readonly batchId = input.required<number>();
  /** Changes whenever the jobs table reloads, so the counts follow it. */
  readonly refresh = input(0);
  readonly closed = output<void>();
  /** After a cancel: the table should reload. */
  readonly changed = output<void>();

  protected readonly states = JOB_STATES;
  protected readonly look = STATE_LOOK;
  protected readonly batch = signal<JobBatchDto | null>(null);
  protected readonly percent = computed(() => {
    const b = this.batch();
    return b?.totalWindows ? (100 * (b.windowsDone ?? 0)) / b.totalWindows : 0;
  });
  private readonly unfinished = computed(() => {
    const counts: Partial<Record<JobState, number>> = this.batch()?.counts ?? {};
    return JOB_STATES.filter((s) => !isFinalJobState(s)).reduce((n, s) => n + (counts[s] ?? 0), 0);
  });
  protected readonly canCancel = computed(() => {
    const b = this.batch();
    return !!b && this.unfinished() > 0 && (b.ownerId === this.session.user()?.id || this.session.hasRole('operations'));
  });

  constructor() {
    effect(() => {
      const id = this.batchId();
      this.refresh();
      void this.load(id);
    });
  }

  protected async cancelRest(): Promise<void> {
    const n = this.unfinished();
    const data: ConfirmData = {
      title: `Cancel the ${n} unfinished job${n === 1 ? '' : 's'} of batch ${this.batchId()}?`,
      body: 'Queued jobs leave the queue at once; running ones stop after the window in progress and keep their finished windows (marked partial). Jobs that already ended stay as they are.',
      confirm: 'Cancel unfinished jobs',
    };
    if (!(await firstValueFrom(this.dialog.open(ConfirmDialogComponent, { data }).afterClosed()))) return;
    const r = await firstValueFrom(this.api.post(`/api/jobs/batches/${this.batchId()}/cancel`, {}, cancelBatchResponseSchema));
    this.snack.open(r.message, 'OK', { duration: 6000 });
    this.changed.emit();
    await this.load(this.batchId());
  }

  private async load(id: number): Promise<void> {
    const r = await firstValueFrom(this.api.get(`/api/jobs/batches/${id}`, batchAnswerSchema));
    if (id === this.batchId()) this.batch.set(r.batch);
  }
}

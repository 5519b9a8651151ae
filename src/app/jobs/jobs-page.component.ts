import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { Subject, debounceTime, firstValueFrom } from 'rxjs';
import { JOB_PRIORITY_MAX, JOB_PRIORITY_MIN, JOB_STATES, isFinalJobState, type JobDto, type JobState, type QueueStatus } from '../../../shared/api/jobs.js';
import { ApiService } from '../core/api.service';
import { LiveIndicatorComponent } from '../core/live-indicator.component';
import { LiveService } from '../core/live.service';
import { SessionService } from '../core/session.service';
import { EmptyStateComponent } from '../ui/empty-state.component';
import { PageHeaderComponent } from '../ui/page-header.component';
import { BatchStripComponent } from './batch-strip.component';
import { ConfirmDialogComponent, type ConfirmData } from './confirm-dialog.component';
import { STATE_LOOK, formatDuration, progressPercent, shortTime } from './job-format';
import { jobActionSchema, jobListSchema, queueAnswerSchema, recordingListSchema } from './jobs-api';
import { NodesPanelComponent } from './nodes-panel.component';

type SortKey = 'created' | 'priority' | 'state' | 'name' | 'updated';

/** /jobs: every job with live state and progress; filters, sort and pages are server-side. */
@Component({
  selector: 'ns-jobs-page',
  imports: [
    BatchStripComponent,
    EmptyStateComponent,
    FormsModule,
    LiveIndicatorComponent,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatMenuModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    NodesPanelComponent,
    PageHeaderComponent,
    RouterLink,
  ],
  templateUrl: './jobs-page.component.html',
  styleUrl: './jobs-page.component.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class JobsPageComponent {
  private readonly api = inject(ApiService);
  private readonly live = inject(LiveService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly session = inject(SessionService);
  private readonly router = inject(Router);

  protected readonly states = JOB_STATES;
  protected readonly look = STATE_LOOK;
  protected readonly isOps = computed(() => this.session.hasRole('operations'));
  protected readonly me = computed(() => this.session.user()?.id ?? -1);
  protected readonly columns = computed(() => [
    'name', 'state', 'priority', 'owner', 'recording', 'progress', 'rate', 'created', 'ran', 'actions',
  ]);

  protected readonly stateFilter = signal<JobState[]>([]);
  protected readonly ownerFilter = signal<'all' | 'me'>('all');
  /** Show only the jobs of one batch (?batch=N, so the view can be linked). */
  protected readonly batchFilter = signal<number | null>(null);
  /** Bumped on every reload so the batch strip's counts follow the table. */
  protected readonly reloadCount = signal(0);
  protected readonly sort = signal<{ key: SortKey; order: 'asc' | 'desc' }>({ key: 'created', order: 'desc' });
  protected readonly page = signal({ index: 0, size: 25 });

  protected readonly jobs = signal<JobDto[]>([]);
  protected readonly total = signal(0);
  protected readonly loaded = signal(false);
  protected readonly queue = signal<QueueStatus | null>(null);
  private readonly recordingNames = signal(new Map<number, string>());
  private readonly reloads = new Subject<void>();

  protected readonly progressPercent = progressPercent;
  protected readonly formatDuration = formatDuration;
  protected readonly shortTime = shortTime;
  protected readonly priorityRange = { min: JOB_PRIORITY_MIN, max: JOB_PRIORITY_MAX };

  constructor() {
    const destroy = inject(DestroyRef);
    const batch = Number(inject(ActivatedRoute).snapshot.queryParamMap.get('batch'));
    if (Number.isInteger(batch) && batch > 0) this.batchFilter.set(batch);
    this.reloads.pipe(debounceTime(300), takeUntilDestroyed(destroy)).subscribe(() => void this.reload());
    this.live
      .watch(['jobs', 'queue'])
      .pipe(takeUntilDestroyed(destroy))
      .subscribe((m) => {
        if (m.type === 'job') this.onLiveJob(m.job);
        else if (m.type === 'queue') this.queue.set(m.status);
      });
    // After every (re)connect: reload from REST so nothing that happened meanwhile is missed.
    this.live.opened$.pipe(takeUntilDestroyed(destroy)).subscribe(() => this.reloads.next());
    void this.reload();
    void firstValueFrom(this.api.get('/api/recordings', recordingListSchema, { params: { pageSize: 200 } })).then((r) =>
      this.recordingNames.set(new Map(r.items.map((i) => [i.id, i.name]))),
    );
  }

  /** "13:05 → 13:09" (times of day, UTC), or what is known so far. */
  protected ran(job: JobDto): string {
    const t = (iso: string | null) => (iso ? new Date(iso).toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit', timeZone: 'UTC' }) : '');
    if (!job.startedAt) return '–';
    return `${t(job.startedAt)} → ${job.finishedAt ? t(job.finishedAt) : '…'}`;
  }

  protected lookOf(job: JobDto): { label: string; icon: string } {
    return STATE_LOOK[job.state];
  }

  protected recordingName(job: JobDto): string {
    if (job.recordingId === null) return '–';
    return this.recordingNames().get(job.recordingId) ?? `recording ${job.recordingId}`;
  }

  protected canCancel(job: JobDto): boolean {
    return !isFinalJobState(job.state) && !job.cancelRequested && (job.ownerId === this.me() || this.isOps());
  }

  protected setStates(states: JobState[]): void {
    this.stateFilter.set(states);
    this.page.update((p) => ({ ...p, index: 0 }));
    void this.reload();
  }

  protected setOwner(owner: 'all' | 'me'): void {
    this.ownerFilter.set(owner);
    this.page.update((p) => ({ ...p, index: 0 }));
    void this.reload();
  }

  protected setBatch(batchId: number | null): void {
    this.batchFilter.set(batchId);
    this.page.update((p) => ({ ...p, index: 0 }));
    void this.router.navigate([], { queryParams: { batch: batchId }, replaceUrl: true });
    void this.reload();
  }

  protected onSort(s: Sort): void {
    this.sort.set({ key: (s.active || 'created') as SortKey, order: s.direction || 'desc' });
    void this.reload();
  }

  protected onPage(e: PageEvent): void {
    this.page.set({ index: e.pageIndex, size: e.pageSize });
    void this.reload();
  }

  protected async cancel(job: JobDto): Promise<void> {
    const data: ConfirmData = {
      title: `Cancel “${job.name}”?`,
      body:
        job.state === 'running'
          ? 'The job stops after the window in progress. Finished windows are kept and marked partial; the rest is not computed.'
          : 'The job leaves the queue and never runs.',
      confirm: 'Cancel job',
    };
    if (!(await firstValueFrom(this.dialog.open(ConfirmDialogComponent, { data }).afterClosed()))) return;
    const r = await firstValueFrom(this.api.post(`/api/jobs/${job.id}/cancel`, {}, jobActionSchema));
    this.replace(r.job);
    this.snack.open(r.message ?? 'Cancelled.', 'OK', { duration: 5000 });
  }

  protected async setPriority(job: JobDto, value: string): Promise<void> {
    const priority = Number(value);
    if (!Number.isInteger(priority) || priority < JOB_PRIORITY_MIN || priority > JOB_PRIORITY_MAX) {
      this.snack.open(`Priority must be a whole number from ${JOB_PRIORITY_MIN} to ${JOB_PRIORITY_MAX}.`, 'OK', { duration: 6000, panelClass: 'ns-snack-error' });
      return;
    }
    if (priority === job.priority) return;
    const r = await firstValueFrom(this.api.patch(`/api/jobs/${job.id}/priority`, { priority }, jobActionSchema));
    this.replace(r.job);
    this.snack.open(`Priority of “${job.name}” is now ${r.job.priority}.`, 'OK', { duration: 4000 });
  }

  protected async togglePause(): Promise<void> {
    const paused = this.queue()?.paused ?? false;
    if (!paused) {
      const data: ConfirmData = { title: 'Pause the queue?', body: 'Running jobs carry on; no queued job starts until you resume.', confirm: 'Pause queue' };
      if (!(await firstValueFrom(this.dialog.open(ConfirmDialogComponent, { data }).afterClosed()))) return;
    }
    const r = await firstValueFrom(this.api.post(paused ? '/api/queue/resume' : '/api/queue/pause', {}, queueAnswerSchema));
    this.queue.set(r);
    if (r.message) this.snack.open(r.message, 'OK', { duration: 5000 });
  }

  private onLiveJob(job: JobDto): void {
    const list = this.jobs();
    const i = list.findIndex((j) => j.id === job.id);
    if (i < 0 || list[i].state !== job.state) this.reloads.next(); // new job or a move between filters/sort positions
    if (i >= 0) this.replace(job);
  }

  private replace(job: JobDto): void {
    this.jobs.update((list) => list.map((j) => (j.id === job.id ? { ...job, ownerName: job.ownerName ?? j.ownerName } : j)));
  }

  protected async reload(): Promise<void> {
    const s = this.sort();
    const p = this.page();
    const params: Record<string, string | number> = { sort: s.key, order: s.order, limit: p.size, offset: p.index * p.size };
    if (this.stateFilter().length) params['state'] = this.stateFilter().join(',');
    if (this.ownerFilter() === 'me') params['owner'] = 'me';
    const batch = this.batchFilter();
    if (batch !== null) params['batch'] = batch;
    const [list, queue] = await Promise.all([
      firstValueFrom(this.api.get('/api/jobs', jobListSchema, { params })),
      firstValueFrom(this.api.get('/api/queue', queueAnswerSchema)),
    ]);
    this.jobs.set(list.items);
    this.total.set(list.total);
    this.queue.set(queue);
    this.loaded.set(true);
    this.reloadCount.update((n) => n + 1);
  }
}

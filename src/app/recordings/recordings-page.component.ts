import { ChangeDetectionStrategy, Component, effect, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { RecordingSummary } from '../../../shared/api/recordings';
import { UploadQueueService } from '../core/upload-queue.service';
import { PageHeaderComponent } from '../ui/page-header.component';
import { RecordingsApi, type RecordingQuery } from './recordings-api';
import { formatDuration, formatSize } from './recording-format';
import { UploadPanelComponent } from './upload-panel.component';

/** /recordings: upload panel and the recordings table (sorted, filtered and paged by the server). */
@Component({
  selector: 'ns-recordings-page',
  imports: [FormsModule, MatFormFieldModule, MatInputModule, MatPaginatorModule, MatProgressBarModule, MatSortModule, MatTableModule, PageHeaderComponent, RouterLink, UploadPanelComponent],
  template: `
    <ns-page-header heading="Recordings" summary="Multichannel recordings from your arrays, checked on arrival and ready to beamform." />
    <ns-upload-panel />
    <mat-form-field class="filter" appearance="outline">
      <mat-label>Filter by name, format, state or array</mat-label>
      <input matInput [ngModel]="query().q" (ngModelChange)="setFilter($event)" data-testid="recordings-filter" />
    </mat-form-field>
    <table mat-table [dataSource]="rows()" matSort [matSortActive]="query().sort" [matSortDirection]="query().dir" (matSortChange)="sorted($event)" data-testid="recordings-table">
      <ng-container matColumnDef="name"><th mat-header-cell *matHeaderCellDef mat-sort-header>Name</th>
        <td mat-cell *matCellDef="let r"><a [routerLink]="['/recordings', r.id]">{{ r.name }}</a></td></ng-container>
      <ng-container matColumnDef="format"><th mat-header-cell *matHeaderCellDef mat-sort-header>Format</th><td mat-cell *matCellDef="let r">{{ r.format ?? r.declaredFormat }}</td></ng-container>
      <ng-container matColumnDef="channels"><th mat-header-cell *matHeaderCellDef mat-sort-header>Channels</th><td mat-cell *matCellDef="let r">{{ r.channels ?? '–' }}</td></ng-container>
      <ng-container matColumnDef="sampleRate"><th mat-header-cell *matHeaderCellDef mat-sort-header>Rate (Hz)</th><td mat-cell *matCellDef="let r">{{ r.sampleRate ?? '–' }}</td></ng-container>
      <ng-container matColumnDef="durationS"><th mat-header-cell *matHeaderCellDef mat-sort-header>Duration</th><td mat-cell *matCellDef="let r">{{ duration(r.durationS) }}</td></ng-container>
      <ng-container matColumnDef="sizeBytes"><th mat-header-cell *matHeaderCellDef mat-sort-header>Size</th><td mat-cell *matCellDef="let r">{{ size(r.sizeBytes) }}</td></ng-container>
      <ng-container matColumnDef="state"><th mat-header-cell *matHeaderCellDef mat-sort-header>State</th>
        <td mat-cell *matCellDef="let r" [attr.data-state]="r.state">{{ r.state }}
          @if (r.state === 'inspecting') { <mat-progress-bar mode="determinate" [value]="100 * r.inspectProgress" /> }
        </td></ng-container>
      <ng-container matColumnDef="array"><th mat-header-cell *matHeaderCellDef>Array</th><td mat-cell *matCellDef="let r">{{ r.arrayName ?? '–' }}</td></ng-container>
      <ng-container matColumnDef="createdAt"><th mat-header-cell *matHeaderCellDef mat-sort-header>Added</th><td mat-cell *matCellDef="let r">{{ r.uploadedBy ?? '–' }}, {{ r.createdAt.slice(0, 16).replace('T', ' ') }}</td></ng-container>
      <tr mat-header-row *matHeaderRowDef="columns"></tr>
      <tr mat-row *matRowDef="let row; columns: columns"></tr>
    </table>
    <mat-paginator [length]="total()" [pageIndex]="query().page" [pageSize]="query().pageSize" [pageSizeOptions]="[10, 25, 50, 100]" (page)="paged($event)" />
  `,
  styles: `
    .filter { width: min(420px, 100%); margin-top: 16px; }
    table { width: 100%; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordingsPageComponent {
  private readonly api = inject(RecordingsApi);
  private readonly uploads = inject(UploadQueueService);
  protected readonly columns = ['name', 'format', 'channels', 'sampleRate', 'durationS', 'sizeBytes', 'state', 'array', 'createdAt'];
  protected readonly query = signal<RecordingQuery>({ page: 0, pageSize: 25, sort: 'createdAt', dir: 'desc', q: '' });
  protected readonly rows = signal<RecordingSummary[]>([]);
  protected readonly total = signal(0);
  protected readonly size = formatSize;
  protected readonly duration = formatDuration;
  private poll: ReturnType<typeof setTimeout> | undefined;

  constructor() {
    effect(() => {
      this.uploads.finished();
      this.load(this.query());
    });
  }

  protected sorted(s: Sort): void {
    this.query.update((q) => ({ ...q, sort: s.direction ? s.active : 'createdAt', dir: s.direction || 'desc', page: 0 }));
  }
  protected paged(e: PageEvent): void {
    this.query.update((q) => ({ ...q, page: e.pageIndex, pageSize: e.pageSize }));
  }
  protected setFilter(text: string): void {
    this.query.update((q) => ({ ...q, q: text, page: 0 }));
  }

  private load(q: RecordingQuery): void {
    clearTimeout(this.poll);
    this.api.list(q).subscribe((res) => {
      this.rows.set(res.items);
      this.total.set(res.total);
      // While something is being inspected, refresh its progress.
      if (res.items.some((r) => r.state === 'inspecting')) this.poll = setTimeout(() => this.load(this.query()), 1500);
    });
  }
}

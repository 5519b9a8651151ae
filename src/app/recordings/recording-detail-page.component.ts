import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal, effect } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import type { ArrayRecord } from '../../../shared/api/arrays';
import { QC_THRESHOLDS, type RecordingDetail } from '../../../shared/api/recordings';
import { PageHeaderComponent } from '../ui/page-header.component';
import { RecordingsApi } from './recordings-api';
import { dbfs, formatDuration, formatSize } from './recording-format';

/** /recordings/:id: facts, per-channel QC with flags, the linked array and the jobs that used it. */
@Component({
  selector: 'ns-recording-detail-page',
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, MatTableModule, PageHeaderComponent, RouterLink],
  template: `
    @if (rec(); as r) {
      <ns-page-header [heading]="r.name" [summary]="r.source === 'archive' ? 'Registered in place: ' + r.filePath : 'Stored by Nullsmith'">
        <button mat-stroked-button type="button" (click)="reinspect()">Inspect again</button>
        <button mat-stroked-button type="button" (click)="remove()" data-testid="delete-recording">Delete</button>
      </ns-page-header>
      @if (message()) { <p class="error" role="alert">{{ message() }}</p> }
      <dl class="facts" data-testid="recording-facts">
        <dt>State</dt><dd [attr.data-state]="r.state">{{ r.state }}</dd>
        <dt>Format</dt><dd>{{ r.format ?? r.declaredFormat }} {{ r.datatype ?? '' }}</dd>
        <dt>Channels</dt><dd>{{ r.channels ?? '–' }}</dd>
        <dt>Sample rate</dt><dd>{{ r.sampleRate ?? '–' }} Hz</dd>
        <dt>Duration</dt><dd>{{ duration(r.durationS) }}</dd>
        <dt>Size</dt><dd>{{ size(r.sizeBytes) }}</dd>
        <dt>sha256</dt><dd class="mono">{{ r.sha256 ?? '–' }}</dd>
      </dl>
      @if (r.state === 'inspecting') { <mat-progress-bar mode="determinate" [value]="100 * r.inspectProgress" /> }
      @for (reason of r.rejectReasons; track reason) { <p class="error" data-testid="reject-reason">{{ reason }}</p> }

      <h2>Array</h2>
      <mat-form-field appearance="outline">
        <mat-label>Linked array</mat-label>
        <mat-select [ngModel]="r.arrayId" (ngModelChange)="link($event)">
          <mat-option [value]="null">None</mat-option>
          @for (a of arrays(); track a.id) { <mat-option [value]="a.id">{{ a.name }} (v{{ a.version }}, {{ a.channelsNeeded }} ch)</mat-option> }
        </mat-select>
      </mat-form-field>

      @if (r.qc) {
        <h2>Channel check</h2>
        <p class="muted">Clipped: samples at ≥ {{ clipAt }} of full scale. Dead: RMS below {{ deadRms }} of full scale. Flat: every sample identical.</p>
        <table mat-table [dataSource]="r.qc" data-testid="qc-table">
          <ng-container matColumnDef="channel"><th mat-header-cell *matHeaderCellDef>Ch</th><td mat-cell *matCellDef="let c">{{ c.channel }}</td></ng-container>
          <ng-container matColumnDef="rms"><th mat-header-cell *matHeaderCellDef>RMS</th><td mat-cell *matCellDef="let c">{{ level(c.rms) }}</td></ng-container>
          <ng-container matColumnDef="peak"><th mat-header-cell *matHeaderCellDef>Peak</th><td mat-cell *matCellDef="let c">{{ level(c.peak) }}</td></ng-container>
          <ng-container matColumnDef="dc"><th mat-header-cell *matHeaderCellDef>DC offset</th><td mat-cell *matCellDef="let c">{{ c.dcOffset.toExponential(2) }}</td></ng-container>
          <ng-container matColumnDef="clipped"><th mat-header-cell *matHeaderCellDef>Clipped</th><td mat-cell *matCellDef="let c">{{ c.clipped }}</td></ng-container>
          <ng-container matColumnDef="flags"><th mat-header-cell *matHeaderCellDef>Flags</th>
            <td mat-cell *matCellDef="let c">
              @if (c.clipped > 0) { <span class="flag">clipping</span> }
              @if (c.dead) { <span class="flag">dead</span> }
              @if (c.flat) { <span class="flag">flat</span> }
            </td></ng-container>
          <tr mat-header-row *matHeaderRowDef="qcColumns"></tr>
          <tr mat-row *matRowDef="let row; columns: qcColumns"></tr>
        </table>
      }

      <h2>Jobs that used it</h2>
      @if (r.jobs.length) {
        <ul>@for (j of r.jobs; track j.id) { <li><a [routerLink]="['/jobs']" [queryParams]="{ job: j.id }">Job {{ j.id }}</a> · {{ j.state }}</li> }</ul>
      } @else { <p class="muted">No job has used this recording yet.</p> }
    }
  `,
  styles: `
    .facts { display: grid; grid-template-columns: max-content 1fr; gap: 4px 16px; }
    dt { color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; }
    .mono { font-family: 'Roboto Mono', monospace; word-break: break-all; }
    .error { color: var(--mat-sys-error); }
    .muted { color: var(--mat-sys-on-surface-variant); }
    .flag { display: inline-block; padding: 0 8px; margin-right: 4px; border-radius: 8px; background: var(--mat-sys-error-container); color: var(--mat-sys-on-error-container); }
    table { width: 100%; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordingDetailPageComponent {
  readonly id = input.required<string>();
  private readonly api = inject(RecordingsApi);
  private readonly http = inject(HttpClient);
  private readonly router = inject(Router);
  protected readonly rec = signal<RecordingDetail | null>(null);
  protected readonly arrays = signal<ArrayRecord[]>([]);
  protected readonly message = signal('');
  protected readonly qcColumns = ['channel', 'rms', 'peak', 'dc', 'clipped', 'flags'];
  protected readonly clipAt = QC_THRESHOLDS.clipFraction;
  protected readonly deadRms = QC_THRESHOLDS.deadRms;
  protected readonly size = formatSize;
  protected readonly duration = formatDuration;
  protected readonly level = dbfs;
  private readonly numericId = computed(() => Number(this.id()));
  private poll: ReturnType<typeof setTimeout> | undefined;

  constructor() {
    effect(() => this.load(this.numericId()));
    this.http.get<{ arrays: ArrayRecord[] }>('/api/arrays').subscribe((r) => this.arrays.set(r.arrays));
    inject(DestroyRef).onDestroy(() => clearTimeout(this.poll));
  }

  protected link(arrayId: number | null): void {
    this.message.set('');
    this.api.patch(this.numericId(), { arrayId }).subscribe({ next: (r) => this.rec.set(r), error: (e) => this.fail(e) });
  }
  protected reinspect(): void {
    this.api.reinspect(this.numericId()).subscribe({ next: (r) => { this.rec.set(r); this.load(r.id); }, error: (e) => this.fail(e) });
  }
  protected remove(): void {
    if (!confirm('Delete this recording? Uploaded files are removed; archive files stay where they are.')) return;
    this.api.remove(this.numericId()).subscribe({ next: () => void this.router.navigate(['/recordings']), error: (e) => this.fail(e) });
  }

  private load(id: number): void {
    clearTimeout(this.poll);
    this.api.get(id).subscribe((r) => {
      this.rec.set(r);
      if (r.state === 'inspecting') this.poll = setTimeout(() => this.load(id), 1000);
    });
  }
  private fail(e: { error?: { error?: { message?: string } } }): void {
    this.message.set(e.error?.error?.message ?? 'The request failed; try again.');
    this.load(this.numericId());
  }
}

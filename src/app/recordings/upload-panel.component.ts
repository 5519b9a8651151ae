import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { checkPickedFiles, type RefusedFile } from '../core/upload-header-check';
import { UploadQueueService } from '../core/upload-queue.service';
import { formatEta, formatSize } from './recording-format';

/** Drop or pick recordings; each is header-checked in the browser, then sent in chunks with progress. */
@Component({
  selector: 'ns-upload-panel',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, RouterLink],
  template: `
    <div class="drop" [class.over]="over()" (dragover)="$event.preventDefault(); over.set(true)" (dragleave)="over.set(false)" (drop)="dropped($event)">
      <mat-icon aria-hidden="true">move_to_inbox</mat-icon>
      <span>Drop WAV, RF64, SigMF (meta + data) or raw files (data + JSON side file) here, or</span>
      <button mat-stroked-button type="button" (click)="picker.click()">pick files</button>
      <input #picker type="file" multiple hidden data-testid="upload-input" (change)="picked(picker)" />
    </div>
    @for (r of refused(); track r.name) {
      <p class="refused" role="alert" data-testid="upload-refused"><mat-icon aria-hidden="true">block</mat-icon> <b>{{ r.name }}</b> not sent: {{ r.reason }}</p>
    }
    @if (queue.items().length) {
      <ul class="items">
        @for (u of queue.items(); track u.key) {
          <li data-testid="upload-item" [attr.data-state]="u.state">
            <div class="row">
              <b>{{ u.name }}</b><span class="muted">{{ u.summary }}</span>
              <span class="spacer"></span>
              <span class="muted">{{ size(u.sentBytes) }} / {{ size(u.sizeBytes) }}@if (u.rate > 0 && u.state === 'sending') { · {{ size(u.rate) }}/s · {{ eta(u.etaSeconds) }} }</span>
              @if (u.state === 'sending' || u.state === 'queued') {
                <button mat-button type="button" (click)="queue.cancel(u.key)">Cancel</button>
              }
              @if (u.recordingId) {
                <a mat-button [routerLink]="['/recordings', u.recordingId]">Open</a>
              }
            </div>
            <mat-progress-bar [mode]="u.state === 'finishing' ? 'indeterminate' : 'determinate'" [value]="(100 * u.sentBytes) / u.sizeBytes" />
            <small [class.error]="u.state === 'failed'">{{ u.message }}</small>
          </li>
        }
      </ul>
      <button mat-button type="button" (click)="queue.clearFinished()">Clear finished</button>
    }
  `,
  styles: `
    .drop { display: flex; align-items: center; gap: 12px; flex-wrap: wrap; padding: 16px; border: 2px dashed var(--mat-sys-outline-variant); border-radius: 12px; }
    .drop.over { border-color: var(--mat-sys-primary); background: var(--mat-sys-surface-container); }
    .refused { display: flex; align-items: center; gap: 6px; color: var(--mat-sys-error); margin: 8px 0; }
    .items { list-style: none; padding: 0; margin: 12px 0 0; display: grid; gap: 10px; }
    .row { display: flex; align-items: center; gap: 12px; flex-wrap: wrap; }
    .spacer { flex: 1; }
    .muted { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); }
    small.error { color: var(--mat-sys-error); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UploadPanelComponent {
  protected readonly queue = inject(UploadQueueService);
  protected readonly over = signal(false);
  protected readonly refused = signal<RefusedFile[]>([]);
  protected readonly size = formatSize;
  protected readonly eta = formatEta;

  protected dropped(e: DragEvent): void {
    e.preventDefault();
    this.over.set(false);
    void this.take([...(e.dataTransfer?.files ?? [])]);
  }

  protected picked(input: HTMLInputElement): void {
    void this.take([...(input.files ?? [])]);
    input.value = '';
  }

  private async take(files: File[]): Promise<void> {
    const { ok, refused } = await checkPickedFiles(files);
    this.refused.set(refused);
    this.queue.enqueue(ok);
  }
}

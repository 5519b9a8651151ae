import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, type FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import * as z from 'zod';
import { adminSettingsResponseSchema, type AdminSettingsResponse } from '../../../shared/api/admin-settings.js';
import { ApiService } from '../core/api.service';
import { PageHeaderComponent } from '../ui/page-header.component';
import { AdminTabsComponent } from './admin-tabs.component';
import { PANEL_STYLES } from './panel.styles';

const MiB = 1024 ** 2;
const GiB = 1024 ** 3;
const sweepSchema = z.object({ jobIds: z.array(z.number()), bytesReclaimed: z.number(), pinnedKept: z.number(), retentionDays: z.number() }).loose();
const rootsSchema = z.object({ roots: z.array(z.object({ id: z.number(), name: z.string(), path: z.string(), recordingCount: z.number(), reachable: z.boolean() }).loose()) });

/** /admin/settings: limits, retention and concurrency (applied without a restart), archive roots. */
@Component({
  selector: 'ns-settings-page',
  imports: [DecimalPipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatProgressBarModule, PageHeaderComponent, AdminTabsComponent],
  template: `
    <ns-page-header heading="Admin" summary="Settings apply at once, without a restart." />
    <ns-admin-tabs />
    <section class="panel" aria-labelledby="limits-title">
      <header class="panel-head"><h2 id="limits-title">Limits and retention</h2></header>
      @if (current.isLoading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading settings" />
      }
      <form class="panel-body" [formGroup]="form" (ngSubmit)="save()">
        <div class="row">
          <mat-form-field>
            <mat-label>Largest upload (GiB)</mat-label>
            <input matInput type="number" min="0.001" step="any" formControlName="maxUploadGiB" />
            <mat-hint>{{ source('maxUploadBytes') }}</mat-hint>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Storage per person (GiB)</mat-label>
            <input matInput type="number" min="0.001" step="any" formControlName="userQuotaGiB" />
            <mat-hint>{{ source('userQuotaBytes') }}</mat-hint>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Keep results (days, 0 = for ever)</mat-label>
            <input matInput type="number" min="0" step="1" formControlName="resultRetentionDays" />
            <mat-hint>{{ source('resultRetentionDays') }}</mat-hint>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Jobs at once per node</mat-label>
            <input matInput type="number" min="1" step="1" formControlName="workerConcurrency" />
            <mat-hint>{{ source('workerConcurrency') }}</mat-hint>
          </mat-form-field>
        </div>
        <div class="row actions">
          <button mat-flat-button type="submit" [disabled]="form.invalid || busy()">Save settings</button>
          @if (saved()) {
            <span role="status">Saved and applied.</span>
          }
        </div>
      </form>
      <div class="panel-body">
        <p class="hint">
          Results of jobs that ended longer ago than the retention period are deleted every hour; pinned jobs are kept.
          @if (current.hasValue() && current.value().retention.lastSweepAt) {
            Last sweep {{ current.value().retention.lastSweepAt }}: {{ current.value().retention.lastSweepJobs }} job(s),
            {{ current.value().retention.lastSweepBytes / 1048576 | number: '1.0-1' }} MiB.
          }
        </p>
        <button mat-stroked-button type="button" (click)="sweep()" [disabled]="busy()">Delete expired results now</button>
        @if (sweepNote()) {
          <span class="note" role="status">{{ sweepNote() }}</span>
        }
      </div>
    </section>

    <section class="panel" aria-labelledby="roots-title">
      <header class="panel-head"><h2 id="roots-title">Archive roots</h2></header>
      <div class="panel-body">
        <p class="hint">Server folders whose recordings analysts register in place (nothing is copied).</p>
        @if (roots.hasValue()) {
          <ul class="roots">
            @for (r of roots.value().roots; track r.id) {
              <li>
                <strong>{{ r.name }}</strong> <span class="mono">{{ r.path }}</span> · {{ r.recordingCount }} recording(s)
                @if (!r.reachable) {
                  <span class="warn">not reachable</span>
                }
                <button mat-button type="button" (click)="removeRoot(r.id)">Remove</button>
              </li>
            } @empty {
              <li>No archive roots yet.</li>
            }
          </ul>
        }
        <form class="row" [formGroup]="rootForm" #rootFd="ngForm" (ngSubmit)="addRoot(rootFd)">
          <mat-form-field><mat-label>Name</mat-label><input matInput formControlName="name" /></mat-form-field>
          <mat-form-field class="wide"><mat-label>Folder on the server (absolute path)</mat-label><input matInput formControlName="path" /></mat-form-field>
          <button mat-stroked-button type="submit" [disabled]="rootForm.invalid">Add root</button>
        </form>
      </div>
    </section>
  `,
  styles: `
    ${PANEL_STYLES}
    .actions { margin-top: 8px; }
    .note { margin-left: 12px; }
    .roots { padding-left: 18px; }
    .warn { color: var(--mat-sys-error); }
    .wide { min-width: 320px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SettingsPageComponent {
  private readonly api = inject(ApiService);
  protected readonly busy = signal(false);
  protected readonly saved = signal(false);
  protected readonly sweepNote = signal('');
  protected readonly form = new FormGroup({
    maxUploadGiB: new FormControl(0, { nonNullable: true, validators: [Validators.required, Validators.min(1 / 1024)] }),
    userQuotaGiB: new FormControl(0, { nonNullable: true, validators: [Validators.required, Validators.min(1 / 1024)] }),
    resultRetentionDays: new FormControl(0, { nonNullable: true, validators: [Validators.required, Validators.min(0)] }),
    workerConcurrency: new FormControl(1, { nonNullable: true, validators: [Validators.required, Validators.min(1)] }),
  });
  protected readonly rootForm = new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    path: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
  });
  protected readonly current = rxResource({ stream: () => this.api.get('/api/settings', adminSettingsResponseSchema) });
  protected readonly roots = rxResource({ stream: () => this.api.get('/api/archives', rootsSchema) });

  constructor() {
    this.api.get('/api/settings', adminSettingsResponseSchema).subscribe((s) => this.fill(s));
  }

  protected source(key: string): string {
    const s = this.current.hasValue() ? this.current.value().sources[key] : undefined;
    return s === 'admin' ? 'Set here' : s === 'environment' ? 'From the environment' : s ? 'Default' : '';
  }

  protected save(): void {
    const v = this.form.getRawValue();
    this.busy.set(true);
    this.saved.set(false);
    const body = {
      maxUploadBytes: Math.round(v.maxUploadGiB * GiB),
      userQuotaBytes: Math.round(v.userQuotaGiB * GiB),
      resultRetentionDays: v.resultRetentionDays,
      workerConcurrency: v.workerConcurrency,
    };
    this.api.patch('/api/settings', body, adminSettingsResponseSchema).subscribe({
      next: (s) => {
        this.fill(s);
        this.current.reload();
        this.saved.set(true);
        this.busy.set(false);
      },
      error: () => this.busy.set(false),
    });
  }

  protected sweep(): void {
    this.busy.set(true);
    this.api.post('/api/retention/sweep', {}, sweepSchema).subscribe({
      next: (r) => {
        this.sweepNote.set(
          r.retentionDays === 0
            ? 'Retention is 0: results are kept for ever.'
            : `Deleted the results of ${r.jobIds.length} job(s), ${(r.bytesReclaimed / MiB).toFixed(1)} MiB reclaimed; ${r.pinnedKept} pinned job(s) kept.`,
        );
        this.current.reload();
        this.busy.set(false);
      },
      error: () => this.busy.set(false),
    });
  }

  protected addRoot(fd: FormGroupDirective): void {
    this.api.post('/api/archives', this.rootForm.getRawValue(), z.unknown()).subscribe(() => {
      fd.resetForm({ name: '', path: '' });
      this.roots.reload();
    });
  }

  protected removeRoot(id: number): void {
    this.api.delete(`/api/archives/${id}`).subscribe(() => this.roots.reload());
  }

  private fill(s: AdminSettingsResponse): void {
    this.form.setValue({
      maxUploadGiB: s.settings.maxUploadBytes / GiB,
      userQuotaGiB: s.settings.userQuotaBytes / GiB,
      resultRetentionDays: s.settings.resultRetentionDays,
      workerConcurrency: s.settings.workerConcurrency,
    });
  }
}

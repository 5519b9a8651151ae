import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { RunInfo } from '../../../shared/api/results.js';

const LIST = /^\s*\d+(\s*,\s*\d+)*\s*$/;

/** weights.csv and sinr.csv links with window range, beams, bins and gzip, checked before use. */
@Component({
  selector: 'ns-downloads-panel',
  imports: [FormsModule, MatButtonModule, MatIconModule],
  template: `
    <div class="grid">
      <label>Windows from <input type="number" min="0" [ngModel]="from()" (ngModelChange)="from.set($event)" /></label>
      <label>to <input type="number" min="0" [ngModel]="to()" (ngModelChange)="to.set($event)" [placeholder]="windowsStored() - 1" /></label>
      <label class="wide">Beams (indices, blank = all) <input [ngModel]="beams()" (ngModelChange)="beams.set($event)" placeholder="e.g. 52,111" /></label>
      <label class="wide">Bins (positions, blank = all) <input [ngModel]="bins()" (ngModelChange)="bins.set($event)" placeholder="e.g. 0,5,10" /></label>
      <label class="check"><input type="checkbox" [ngModel]="gzip()" (ngModelChange)="gzip.set($event)" /> gzip (.csv.gz)</label>
    </div>
    @if (problem()) {
      <p class="err" role="alert">{{ problem() }}</p>
    } @else {
      <div class="links">
        <a mat-flat-button [href]="href('weights')" download data-testid="download-weights"><mat-icon>download</mat-icon>weights.csv</a>
        <a mat-stroked-button [href]="href('sinr')" download data-testid="download-sinr"><mat-icon>download</mat-icon>sinr.csv</a>
      </div>
    }
    <p class="note">Saved beams: {{ savedText() }}. Both files start with # comment lines stating the conventions and the caution; weights.csv covers saved beams only.</p>
  `,
  styles: `
    .grid { display: grid; grid-template-columns: 1fr 1fr; gap: 8px 16px; font: var(--mat-sys-body-small); }
    label { display: flex; flex-direction: column; gap: 2px; }
    .wide { grid-column: span 2; }
    .check { flex-direction: row; align-items: center; gap: 6px; }
    input:not([type='checkbox']) { padding: 6px 8px; border: 1px solid var(--mat-sys-outline); border-radius: 6px; font: var(--mat-sys-body-medium); }
    .links { display: flex; gap: 8px; margin-top: 12px; }
    .err { color: var(--mat-sys-error); }
    .note { font: var(--mat-sys-body-small); color: var(--mat-sys-on-surface-variant); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DownloadsPanelComponent {
  readonly jobId = input.required<number>();
  readonly run = input.required<RunInfo>();
  readonly windowsStored = input(0);
  protected readonly from = signal<number | null>(null);
  protected readonly to = signal<number | null>(null);
  protected readonly beams = signal('');
  protected readonly bins = signal('');
  protected readonly gzip = signal(false);

  protected readonly savedText = computed(() => {
    const s = this.run().setup;
    return s.savedBeams.map((b) => `${b} (${s.azimuthsDeg[b]}°)`).join(', ') || 'none';
  });

  protected readonly problem = computed(() => {
    const last = this.windowsStored() - 1;
    const from = this.from();
    const to = this.to();
    if (from !== null && `${from}` !== '' && (!Number.isInteger(+from) || +from < 0)) return 'Windows from must be a whole number from 0.';
    if (to !== null && `${to}` !== '' && (!Number.isInteger(+to) || +to > last)) return `Windows to must be a whole number up to ${last} (the last stored window).`;
    if (from !== null && to !== null && `${from}` !== '' && `${to}` !== '' && +to < +from) return 'Windows to is before windows from.';
    if (this.beams() && !LIST.test(this.beams())) return 'Beams must be comma-separated beam indices, e.g. 52,111.';
    if (this.bins() && !LIST.test(this.bins())) return 'Bins must be comma-separated bin positions, e.g. 0,5,10.';
    const s = this.run().setup;
    const badBeam = this.beams() ? this.beams().split(',').map(Number).find((b) => b >= s.azimuthsDeg.length) : undefined;
    if (badBeam !== undefined) return `Beam ${badBeam} does not exist: this job has beams 0..${s.azimuthsDeg.length - 1}.`;
    const badBin = this.bins() ? this.bins().split(',').map(Number).find((b) => b >= s.bins.length) : undefined;
    if (badBin !== undefined) return `Bin ${badBin} does not exist: this job has bins 0..${s.bins.length - 1}.`;
    return '';
  });

  protected href(file: 'weights' | 'sinr'): string {
    const q = new URLSearchParams();
    if (this.from() !== null && `${this.from()}` !== '') q.set('fromWindow', String(this.from()));
    if (this.to() !== null && `${this.to()}` !== '') q.set('toWindow', String(this.to()));
    if (this.beams()) q.set('beams', this.beams().replace(/\s/g, ''));
    if (this.bins()) q.set('bins', this.bins().replace(/\s/g, ''));
    if (this.gzip()) q.set('gzip', 'on');
    const s = q.toString();
    return `/api/results/${this.jobId()}/${file}.csv${s ? '?' + s : ''}`;
  }
}

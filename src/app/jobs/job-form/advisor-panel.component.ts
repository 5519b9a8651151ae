import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { formatBytes, formatDuration } from '../job-format';
import type { Advice } from './job-advice';

/** The advisor beside the job form: snapshot support, expected losses, aliasing, size and time. */
@Component({
  selector: 'ns-advisor-panel',
  imports: [DecimalPipe, MatIconModule],
  template: `
    <h2><mat-icon aria-hidden="true">tips_and_updates</mat-icon>Advisor</h2>
    @if (advice(); as a) {
      <dl data-testid="advisor">
        <dt>Elements N</dt><dd class="num">{{ a.n }}</dd>
        <dt>Snapshots K</dt><dd class="num">{{ a.k }} <span class="muted">(K/N = {{ a.kOverN | number: '1.1-1' }})</span></dd>
        <dt>Expected SMI loss</dt>
        <dd class="num">
          @if (a.loss) {
            {{ a.loss.meanDb | number: '1.2-2' }} dB <span class="muted">({{ a.loss.lowDb | number: '1.1-1' }} to {{ a.loss.highDb | number: '1.1-1' }} dB, ±1σ)</span>
          } @else { – }
        </dd>
        <dt>Noise eigenvalue spread</dt>
        <dd class="num">{{ a.mpSpreadDb === null ? 'K < N' : (a.mpSpreadDb | number: '1.1-1') + ' dB' }}</dd>
        <dt>Alias-free up to</dt>
        <dd class="num">{{ a.aliasing ? (a.aliasing.maxFrequencyHz | number: '1.0-0') + ' Hz' : '–' }}</dd>
        <dt>Bins × beams</dt><dd class="num">{{ a.bins }} × {{ a.beams }}</dd>
        <dt>Windows</dt><dd class="num">{{ a.windows }}</dd>
        <dt>Output (CSV)</dt><dd class="num">≈ {{ bytes(a.outputBytes) }}</dd>
        <dt>Run time</dt><dd class="num">≈ {{ duration(a.runSeconds) }}</dd>
      </dl>
      @for (w of a.warnings; track w) {
        <p class="warn" data-testid="advisor-warning"><mat-icon aria-hidden="true">warning</mat-icon>{{ w }}</p>
      }
      @if (!a.warnings.length) {
        <p class="ok"><mat-icon aria-hidden="true">check</mat-icon>No warnings for these settings.</p>
      }
    } @else {
      <p class="muted">Pick a recording and an array and fix the marked fields to see the advice.</p>
    }
    <label class="limit">Warn when output exceeds
      <input type="number" min="1" [value]="maxOutputMb()" (change)="maxOutputMbChange.emit($any($event.target).value)" /> MB</label>
    <p class="src">Loss: Reed, Mallett &amp; Brennan (1974), mean ± one standard deviation of the Beta law. Spread: Marchenko–Pastur band for N/K. Aliasing: spacing ≤ λ/2 at the top bin. Run time is scaled from a benchmark and is indicative.</p>
  `,
  styles: `
    :host { display: block; padding: 16px; border-radius: 16px; background: var(--mat-sys-surface-container-low); border: 1px solid var(--mat-sys-outline-variant); }
    h2 { display: flex; align-items: center; gap: 8px; margin: 0 0 8px; font: var(--mat-sys-title-medium); color: var(--mat-sys-primary); }
    dl { display: grid; grid-template-columns: auto 1fr; gap: 4px 12px; margin: 0 0 12px; }
    dt { color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; text-align: right; }
    .muted { color: var(--mat-sys-on-surface-variant); }
    .warn, .ok { display: flex; gap: 6px; margin: 6px 0; padding: 8px 10px; border-radius: 8px; font: var(--mat-sys-body-small); }
    .warn { background: var(--mat-sys-tertiary-container); color: var(--mat-sys-on-tertiary-container); }
    .ok { background: var(--mat-sys-surface-container-high); }
    .warn mat-icon, .ok mat-icon { flex: none; width: 18px; height: 18px; font-size: 18px; }
    .limit { display: block; margin-top: 12px; font: var(--mat-sys-body-small); }
    .limit input { width: 70px; margin: 0 4px; }
    .src { font: var(--mat-sys-body-small); color: var(--mat-sys-on-surface-variant); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdvisorPanelComponent {
  readonly advice = input<Advice | null>(null);
  readonly maxOutputMb = input(500);
  readonly maxOutputMbChange = output<string>();
  protected readonly bytes = formatBytes;
  protected readonly duration = formatDuration;
}

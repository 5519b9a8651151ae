import { JsonPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { RunInfo } from '../../../shared/api/results.js';

/** What the run was: parameters, inputs and their checksums, software and conventions versions. */
@Component({
  selector: 'ns-run-info-panel',
  imports: [JsonPipe],
  template: `
    <dl>
      <dt>Software</dt><dd>{{ run().meta['softwareVersion'] ?? 'not recorded' }} · conventions v{{ run().conventionsVersion }}</dd>
      <dt>Recording SHA-256</dt><dd class="mono hash">{{ run().meta['recordingSha256'] ?? '–' }}</dd>
      @if (run().meta['trainingRecordingSha256']) {
        <dt>Training SHA-256</dt><dd class="mono hash">{{ run().meta['trainingRecordingSha256'] }}</dd>
      }
      <dt>Recording</dt><dd class="num">{{ run().recording.sampleRate }} Hz · {{ run().recording.channels }} ch · {{ run().recording.totalFrames }} frames</dd>
      <dt>Array</dt><dd class="num">{{ run().setup.channels }} elements · c = {{ run().setup.speedMps }} m/s</dd>
      <dt>Beamformer</dt><dd>{{ run().setup.beamformer }} · loading {{ loading() }} · K = {{ run().setup.snapshotsPerWindow }}</dd>
      <dt>Band</dt><dd class="num">{{ band() }}</dd>
    </dl>
    <details>
      <summary>Parameters (JSON)</summary>
      <pre class="mono">{{ run().params | json }}</pre>
    </details>
  `,
  styles: `
    dl { display: grid; grid-template-columns: auto 1fr; gap: 4px 12px; margin: 0 0 8px; font: var(--mat-sys-body-small); }
    dt { color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; min-width: 0; }
    .hash { word-break: break-all; font-size: 11px; }
    pre { max-height: 260px; overflow: auto; font-size: 11px; background: var(--mat-sys-surface-container); padding: 8px; border-radius: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunInfoPanelComponent {
  readonly run = input.required<RunInfo>();
  protected readonly loading = computed(() => {
    const l = this.run().setup.loading as { kind: string; levelDb?: number; minWngDb?: number };
    return l.levelDb !== undefined ? `${l.kind} ${l.levelDb} dB` : l.minWngDb !== undefined ? `${l.kind} ${l.minWngDb} dB` : l.kind;
  });
  protected readonly band = computed(() => {
    const f = this.run().setup.binFreqsHz;
    return f.length ? `${f[0].toFixed(1)}–${f[f.length - 1].toFixed(1)} Hz, ${f.length} bins` : '–';
  });
}

import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, computed, effect, inject, input, output, signal, viewChild } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatIconModule } from '@angular/material/icon';
import type { WindowSummaryDto } from '../../../shared/api/live.js';
import { TIDEWATER_LUT, tidewater } from './colour-scale';
import { PLOT_COLOURS, drawAxes, prepareCanvas, saveCanvasPng, sx, sy } from './plot-canvas';

/**
 * Bearing–time map: broadband beam power against azimuth (across) and time (down, latest at
 * the bottom), as a canvas heat map in the tidewater scale. The dB window is set by a ceiling
 * and a depth below it (or follows the data); rows may be levelled so each window's peak is
 * at the ceiling, which keeps faint tracks visible through loud passages.
 */
@Component({
  selector: 'ns-bearing-time-map',
  imports: [FormsModule, MatButtonModule, MatButtonToggleModule, MatIconModule],
  template: `
    <div class="controls">
      <mat-button-toggle-group [ngModel]="source()" (ngModelChange)="source.set($event)" aria-label="Beamformer" hideSingleSelectionIndicator>
        <mat-button-toggle value="adaptive">Adaptive</mat-button-toggle>
        <mat-button-toggle value="conventional">Conventional</mat-button-toggle>
      </mat-button-toggle-group>
      <label class="field">Ceiling <input type="number" step="1" [ngModel]="ceiling()" (ngModelChange)="setCeiling($event)" [disabled]="autoRange()" aria-label="Colour ceiling in dB" /> dB</label>
      <label class="field">Depth <input type="range" min="6" max="60" step="1" [ngModel]="depth()" (ngModelChange)="depth.set(+$event)" aria-label="Colour depth in dB" /> <span class="num">{{ depth() }} dB</span></label>
      <label class="check"><input type="checkbox" [ngModel]="autoRange()" (ngModelChange)="autoRange.set($event)" /> Follow data</label>
      <label class="check"><input type="checkbox" [ngModel]="level()" (ngModelChange)="level.set($event)" /> Level each window</label>
      <span class="spacer"></span>
      <button mat-stroked-button type="button" (click)="save()"><mat-icon>image</mat-icon>PNG</button>
    </div>
    <canvas #canvas (click)="pick($event)" data-testid="bearing-time-map" [attr.data-windows]="windows().length" aria-label="Bearing–time map"></canvas>
  `,
  styles: `
    :host { display: block; }
    .controls { display: flex; flex-wrap: wrap; align-items: center; gap: 8px 16px; margin-bottom: 8px; font: var(--mat-sys-body-small); }
    .field input[type='number'] { width: 56px; }
    .field, .check { display: inline-flex; align-items: center; gap: 6px; }
    .spacer { flex: 1; }
    canvas { display: block; cursor: crosshair; border-radius: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BearingTimeMapComponent {
  readonly windows = input.required<WindowSummaryDto[]>();
  readonly azimuthsDeg = input.required<number[]>();
  readonly totalWindows = input(0);
  readonly selectedWindow = input<number | null>(null);
  readonly fileStem = input('bearing-time-map');
  readonly windowPicked = output<number>();

  protected readonly source = signal<'adaptive' | 'conventional'>('adaptive');
  protected readonly autoRange = signal(true);
  protected readonly ceiling = signal(0);
  protected readonly depth = signal(24);
  protected readonly level = signal(false);
  private readonly width = signal(900);
  private readonly canvas = viewChild.required<ElementRef<HTMLCanvasElement>>('canvas');
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private frame: ReturnType<typeof drawAxes> | null = null;

  private readonly dataPeak = computed(() => {
    let peak = -Infinity;
    const key = this.source() === 'adaptive' ? 'adaptiveDb' : 'conventionalDb';
    for (const w of this.windows()) for (const v of w[key]) if (v !== null && v > peak) peak = v;
    return Number.isFinite(peak) ? Math.ceil(peak) : 0;
  });

  constructor() {
    const ro = new ResizeObserver((entries) => this.width.set(Math.max(360, Math.floor(entries[0].contentRect.width))));
    ro.observe(this.host.nativeElement);
    inject(DestroyRef).onDestroy(() => ro.disconnect());
    effect(() => this.draw());
  }

  protected setCeiling(v: number): void {
    if (Number.isFinite(+v)) this.ceiling.set(+v);
  }

  protected save(): void {
    saveCanvasPng(this.canvas().nativeElement, `${this.fileStem()}.png`);
  }

  protected pick(e: MouseEvent): void {
    const f = this.frame;
    const list = this.windows();
    if (!f || !list.length) return;
    const rect = this.canvas().nativeElement.getBoundingClientRect();
    const y = e.clientY - rect.top;
    const t = f.y1 + ((y - f.top) / f.height) * (f.y0 - f.y1);
    let best = list[0];
    for (const w of list) if (Math.abs((w.tStartS + w.tEndS) / 2 - t) < Math.abs((best.tStartS + best.tEndS) / 2 - t)) best = w;
    this.windowPicked.emit(best.window);
  }

  private draw(): void {
    const list = this.windows();
    const az = this.azimuthsDeg();
    const width = this.width();
    const height = 420;
    const ctx = prepareCanvas(this.canvas().nativeElement, width, height);
    const top = this.autoRange() ? this.dataPeak() : this.ceiling();
    const bottom = top - this.depth();
    const key = this.source() === 'adaptive' ? 'adaptiveDb' : 'conventionalDb';
    const tEnd = list.length ? list[list.length - 1].tEndS : 1;
    const tStart = list.length ? list[0].tStartS : 0;
    // time runs down: y0 (bottom of the axis) is the latest time
    const f = drawAxes(ctx, { width: width - 70, height }, { x0: az[0] ?? -90, x1: az[az.length - 1] ?? 90, y0: tEnd, y1: tStart }, { x: 'Azimuth (°), 0 = broadside', y: 'Time (s)' }, { grid: false });
    this.frame = f;
    if (list.length && az.length) {
      const img = new ImageData(az.length, list.length);
      list.forEach((w, r) => {
        const vals = w[key];
        let rowPeak = -Infinity;
        if (this.level()) for (const v of vals) if (v !== null && v > rowPeak) rowPeak = v;
        const shift = this.level() && Number.isFinite(rowPeak) ? top - rowPeak : 0;
        vals.forEach((v, c) => {
          const i = (r * az.length + c) * 4;
          const t = v === null ? 0 : (v + shift - bottom) / (top - bottom);
          const k = Math.round(Math.min(1, Math.max(0, t)) * 255) * 3;
          img.data[i] = TIDEWATER_LUT[k];
          img.data[i + 1] = TIDEWATER_LUT[k + 1];
          img.data[i + 2] = TIDEWATER_LUT[k + 2];
          img.data[i + 3] = 255;
        });
      });
      const off = document.createElement('canvas');
      off.width = az.length;
      off.height = list.length;
      off.getContext('2d')!.putImageData(img, 0, 0);
      ctx.imageSmoothingEnabled = false;
      const y0 = sy(f, tStart);
      const y1 = sy(f, tEnd);
      ctx.drawImage(off, f.left, y0, f.width, y1 - y0);
      const sel = this.selectedWindow();
      const w = sel !== null ? list.find((x) => x.window === sel) : undefined;
      if (w) {
        ctx.strokeStyle = PLOT_COLOURS.marker;
        ctx.lineWidth = 1.5;
        ctx.strokeRect(f.left, sy(f, w.tStartS), f.width, Math.max(2, sy(f, w.tEndS) - sy(f, w.tStartS)));
      }
      const total = this.totalWindows();
      if (total > list.length) {
        ctx.fillStyle = PLOT_COLOURS.muted;
        ctx.textAlign = 'left';
        ctx.fillText(`${list.length} of ${total} windows so far`, f.left + 6, f.top + f.height - 10);
      }
    }
    // colour bar
    const bx = width - 56;
    for (let y = 0; y < f.height; y++) {
      const [r, g, b] = tidewater(1 - y / f.height);
      ctx.fillStyle = `rgb(${r},${g},${b})`;
      ctx.fillRect(bx, f.top + y, 14, 1);
    }
    ctx.fillStyle = PLOT_COLOURS.ink;
    ctx.textAlign = 'left';
    ctx.textBaseline = 'middle';
    ctx.fillText(`${top}`, bx + 18, f.top + 4);
    ctx.fillText(`${bottom}`, bx + 18, f.top + f.height - 4);
    ctx.fillText('dB', bx + 18, f.top + f.height / 2);
  }
}

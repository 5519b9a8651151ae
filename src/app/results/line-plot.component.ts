import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, effect, inject, input, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { PLOT_COLOURS, drawAxes, drawSeries, prepareCanvas, saveCanvasPng, sx, sy } from './plot-canvas';

export interface PlotSeries {
  label: string;
  xs: ArrayLike<number>;
  ys: ArrayLike<number | null>;
  colour: string;
  dash?: number[];
  /** Draw dots instead of a line (eigenvalues). */
  dots?: boolean;
}

export interface PlotSpec {
  series: PlotSeries[];
  xTitle: string;
  yTitle: string;
  /** Fixed x range; default the data's. */
  xRange?: [number, number];
  /** A shaded horizontal band (e.g. the Marchenko–Pastur band) with its label. */
  yBand?: { y0: number; y1: number; label: string };
  /** Vertical markers (look direction, nulls, a chosen window). */
  xMarks?: { x: number; label?: string; colour?: string }[];
  /** Lower clamp of the y axis (dB plots: a floor so deep nulls do not flatten the rest). */
  yFloor?: number;
}

/** One canvas line plot with a legend and PNG export; redraws when its spec or width changes. */
@Component({
  selector: 'ns-line-plot',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <div class="bar">
      <div class="legend">
        @for (s of spec().series; track s.label) {
          <span><i [style.background]="s.colour"></i>{{ s.label }}</span>
        }
        @if (spec().yBand; as b) {
          <span><i class="band"></i>{{ b.label }}</span>
        }
      </div>
      <button mat-stroked-button type="button" (click)="save()"><mat-icon>image</mat-icon>PNG</button>
    </div>
    <canvas #canvas [attr.aria-label]="spec().yTitle + ' against ' + spec().xTitle"></canvas>
  `,
  styles: `
    :host { display: block; }
    .bar { display: flex; align-items: center; justify-content: space-between; gap: 8px; margin-bottom: 4px; }
    .legend { display: flex; flex-wrap: wrap; gap: 4px 14px; font: var(--mat-sys-body-small); color: var(--mat-sys-on-surface-variant); }
    .legend i { display: inline-block; width: 14px; height: 3px; margin-right: 6px; vertical-align: middle; border-radius: 2px; }
    .legend i.band { height: 10px; background: rgba(11, 110, 138, 0.25); }
    canvas { display: block; border-radius: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LinePlotComponent {
  readonly spec = input.required<PlotSpec>();
  readonly height = input(280);
  readonly fileName = input('plot.png');
  private readonly width = signal(600);
  private readonly canvas = viewChild.required<ElementRef<HTMLCanvasElement>>('canvas');

  constructor() {
    const host = inject<ElementRef<HTMLElement>>(ElementRef).nativeElement;
    const ro = new ResizeObserver((e) => this.width.set(Math.max(280, Math.floor(e[0].contentRect.width))));
    ro.observe(host);
    inject(DestroyRef).onDestroy(() => ro.disconnect());
    effect(() => this.draw());
  }

  protected save(): void {
    saveCanvasPng(this.canvas().nativeElement, this.fileName());
  }

  private draw(): void {
    const spec = this.spec();
    const box = { width: this.width(), height: this.height() };
    const ctx = prepareCanvas(this.canvas().nativeElement, box.width, box.height);
    let x0 = Infinity;
    let x1 = -Infinity;
    let y0 = Infinity;
    let y1 = -Infinity;
    for (const s of spec.series) {
      for (let i = 0; i < s.xs.length; i++) {
        const y = s.ys[i];
        x0 = Math.min(x0, s.xs[i]);
        x1 = Math.max(x1, s.xs[i]);
        if (y !== null && Number.isFinite(y)) {
          y0 = Math.min(y0, y);
          y1 = Math.max(y1, y);
        }
      }
    }
    if (spec.yBand) {
      y0 = Math.min(y0, spec.yBand.y0);
      y1 = Math.max(y1, spec.yBand.y1);
    }
    if (spec.xRange) [x0, x1] = spec.xRange;
    if (!Number.isFinite(y0)) {
      y0 = 0;
      y1 = 1;
    }
    if (spec.yFloor !== undefined) y0 = Math.max(y0, spec.yFloor);
    const pad = (y1 - y0) * 0.06 || 1;
    if (!Number.isFinite(x0) || x0 === x1) {
      x0 = Number.isFinite(x0) ? x0 - 1 : 0;
      x1 = x0 + 2;
    }
    const f = drawAxes(ctx, box, { x0, x1, y0: y0 - pad, y1: y1 + pad }, { x: spec.xTitle, y: spec.yTitle });
    if (spec.yBand) {
      ctx.fillStyle = PLOT_COLOURS.band;
      const top = sy(f, Math.min(spec.yBand.y1, f.y1));
      ctx.fillRect(f.left, top, f.width, sy(f, Math.max(spec.yBand.y0, f.y0)) - top);
    }
    for (const m of spec.xMarks ?? []) {
      if (m.x < f.x0 || m.x > f.x1) continue;
      ctx.strokeStyle = m.colour ?? PLOT_COLOURS.marker;
      ctx.setLineDash([4, 3]);
      ctx.beginPath();
      ctx.moveTo(sx(f, m.x), f.top);
      ctx.lineTo(sx(f, m.x), f.top + f.height);
      ctx.stroke();
      ctx.setLineDash([]);
      if (m.label) {
        ctx.fillStyle = m.colour ?? PLOT_COLOURS.marker;
        ctx.textAlign = 'left';
        ctx.textBaseline = 'top';
        ctx.fillText(m.label, sx(f, m.x) + 4, f.top + 4);
      }
    }
    for (const s of spec.series) {
      if (s.dots) {
        ctx.fillStyle = s.colour;
        for (let i = 0; i < s.xs.length; i++) {
          const y = s.ys[i];
          if (y === null || !Number.isFinite(y)) continue;
          ctx.beginPath();
          ctx.arc(sx(f, s.xs[i]), sy(f, Math.max(y, f.y0)), 4, 0, 2 * Math.PI);
          ctx.fill();
        }
      } else {
        const ys = spec.yFloor === undefined ? s.ys : Array.from(s.ys as ArrayLike<number | null>, (y) => (y === null ? null : Math.max(y, f.y0)));
        drawSeries(f, s.xs, ys, s.colour, 1.8, s.dash ?? []);
      }
    }
  }
}

/**
 * Small canvas drawing kit of the results plots: a frame with axes, ticks and labels in data
 * coordinates, and PNG export. Plain 2D canvas, no plotting library: the plots are few and
 * simple, and a library would triple the results page's bundle.
 */

export interface PlotFrame {
  ctx: CanvasRenderingContext2D;
  /** Plot area in CSS pixels. */
  left: number;
  top: number;
  width: number;
  height: number;
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

export const PLOT_COLOURS = {
  ink: '#1c2a33',
  grid: '#d9e2e7',
  muted: '#5b6b75',
  adaptive: '#0b6e8a',
  conventional: '#b5651d',
  band: 'rgba(11, 110, 138, 0.14)',
  marker: '#c2410c',
  background: '#ffffff',
};

/** Sizes the canvas for the device pixel ratio and clears it; returns a context in CSS pixels. */
export function prepareCanvas(canvas: HTMLCanvasElement, cssWidth: number, cssHeight: number): CanvasRenderingContext2D {
  const ratio = window.devicePixelRatio || 1;
  canvas.width = Math.round(cssWidth * ratio);
  canvas.height = Math.round(cssHeight * ratio);
  canvas.style.width = `${cssWidth}px`;
  canvas.style.height = `${cssHeight}px`;
  const ctx = canvas.getContext('2d')!;
  ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
  ctx.fillStyle = PLOT_COLOURS.background;
  ctx.fillRect(0, 0, cssWidth, cssHeight);
  return ctx;
}

/** 1, 2 or 5 times a power of ten, giving about `count` ticks over the span. */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

export function sx(f: PlotFrame, x: number): number {
  return f.left + ((x - f.x0) / (f.x1 - f.x0 || 1)) * f.width;
}

export function sy(f: PlotFrame, y: number): number {
  return f.top + f.height - ((y - f.y0) / (f.y1 - f.y0 || 1)) * f.height;
}

/** Draws grid, ticks and axis titles; returns the frame for data drawing. */
export function drawAxes(
  ctx: CanvasRenderingContext2D,
  box: { width: number; height: number },
  range: { x0: number; x1: number; y0: number; y1: number },
  titles: { x: string; y: string },
  opts: { grid?: boolean; margin?: { left: number; right: number; top: number; bottom: number } } = {},
): PlotFrame {
  const m = opts.margin ?? { left: 58, right: 16, top: 12, bottom: 40 };
  const f: PlotFrame = { ctx, left: m.left, top: m.top, width: box.width - m.left - m.right, height: box.height - m.top - m.bottom, ...range };
  ctx.font = '11px Roboto, system-ui, sans-serif';
  ctx.fillStyle = PLOT_COLOURS.muted;
  ctx.strokeStyle = PLOT_COLOURS.grid;
  ctx.lineWidth = 1;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const t of niceTicks(Math.min(range.x0, range.x1), Math.max(range.x0, range.x1), Math.max(3, Math.floor(f.width / 80)))) {
    const x = Math.round(sx(f, t)) + 0.5;
    if (opts.grid !== false) line(ctx, x, f.top, x, f.top + f.height);
    ctx.fillText(formatTick(t), x, f.top + f.height + 6);
  }
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const t of niceTicks(Math.min(range.y0, range.y1), Math.max(range.y0, range.y1), Math.max(3, Math.floor(f.height / 50)))) {
    const y = Math.round(sy(f, t)) + 0.5;
    if (opts.grid !== false) line(ctx, f.left, y, f.left + f.width, y);
    ctx.fillText(formatTick(t), f.left - 6, y);
  }
  ctx.strokeStyle = PLOT_COLOURS.muted;
  ctx.strokeRect(f.left + 0.5, f.top + 0.5, f.width, f.height);
  ctx.fillStyle = PLOT_COLOURS.ink;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'bottom';
  ctx.fillText(titles.x, f.left + f.width / 2, box.height - 2);
  ctx.save();
  ctx.translate(12, f.top + f.height / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textBaseline = 'middle';
  ctx.fillText(titles.y, 0, 0);
  ctx.restore();
  return f;
}

function formatTick(v: number): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return v.toExponential(0);
  return String(Number(v.toPrecision(6)));
}

function line(ctx: CanvasRenderingContext2D, x0: number, y0: number, x1: number, y1: number): void {
  ctx.beginPath();
  ctx.moveTo(x0, y0);
  ctx.lineTo(x1, y1);
  ctx.stroke();
}

/** A polyline in data coordinates; null values break the line. */
export function drawSeries(f: PlotFrame, xs: ArrayLike<number>, ys: ArrayLike<number | null>, colour: string, width = 1.6, dash: number[] = []): void {
  const { ctx } = f;
  ctx.save();
  ctx.beginPath();
  ctx.rect(f.left, f.top, f.width, f.height);
  ctx.clip();
  ctx.strokeStyle = colour;
  ctx.lineWidth = width;
  ctx.setLineDash(dash);
  ctx.beginPath();
  let pen = false;
  for (let i = 0; i < xs.length; i++) {
    const y = ys[i];
    if (y === null || !Number.isFinite(y)) {
      pen = false;
      continue;
    }
    const px = sx(f, xs[i]);
    const py = sy(f, y);
    if (pen) ctx.lineTo(px, py);
    else ctx.moveTo(px, py);
    pen = true;
  }
  ctx.stroke();
  ctx.restore();
}

/** Saves a canvas as a PNG download. */
export function saveCanvasPng(canvas: HTMLCanvasElement, fileName: string): void {
  canvas.toBlob((blob) => {
    if (!blob) return;
    const a = document.createElement('a');
    a.href = URL.createObjectURL(blob);
    a.download = fileName;
    a.click();
    setTimeout(() => URL.revokeObjectURL(a.href), 10_000);
  }, 'image/png');
}

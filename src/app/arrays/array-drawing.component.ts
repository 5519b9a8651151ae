import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ArrayElement } from '../../../shared/arrays/array-geometry';

/**
 * Plan view (x right, y up) of element positions with their numbers, plus the look-direction
 * convention of CONVENTIONS.md: azimuth 0 = +y (broadside), +90 = +x (endfire).
 */
@Component({
  selector: 'ns-array-drawing',
  template: `
    <svg [attr.viewBox]="'0 0 ' + W + ' ' + H" role="img" [attr.aria-label]="'Plan view of ' + elements().length + ' elements'" data-testid="array-drawing">
      <line [attr.x1]="pad" [attr.y1]="H - pad" [attr.x2]="W - pad" [attr.y2]="H - pad" class="axis" />
      <text [attr.x]="W - pad" [attr.y]="H - pad + 14" class="label" text-anchor="end">x (m)</text>
      <line [attr.x1]="cx()" [attr.y1]="H / 2" [attr.x2]="cx()" [attr.y2]="18" class="look" />
      <text [attr.x]="cx() + 4" y="16" class="label">az 0° (+y, broadside)</text>
      <line [attr.x1]="cx()" [attr.y1]="H / 2" [attr.x2]="W - 40" [attr.y2]="H / 2" class="look" />
      <text [attr.x]="W - 40" [attr.y]="H / 2 - 6" class="label" text-anchor="end">az +90° (+x, endfire)</text>
      @for (p of points(); track p.n) {
        <circle [attr.cx]="p.x" [attr.cy]="p.y" r="5" [class.excluded]="p.excluded" />
        <text [attr.x]="p.x" [attr.y]="p.y + 18" class="num" text-anchor="middle">{{ p.n }}</text>
      }
    </svg>
  `,
  styles: `
    svg { width: 100%; max-width: 640px; background: var(--mat-sys-surface-container-low); border-radius: 12px; }
    .axis { stroke: var(--mat-sys-outline); }
    .look { stroke: var(--mat-sys-tertiary); stroke-dasharray: 4 3; }
    circle { fill: var(--mat-sys-primary); }
    circle.excluded { fill: none; stroke: var(--mat-sys-error); stroke-width: 2; }
    .label, .num { font: 11px Roboto, sans-serif; fill: var(--mat-sys-on-surface-variant); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ArrayDrawingComponent {
  readonly elements = input.required<ArrayElement[]>();
  protected readonly W = 600;
  protected readonly H = 260;
  protected readonly pad = 40;

  private readonly frame = computed(() => {
    const xs = this.elements().map((e) => e.position[0]);
    const ys = this.elements().map((e) => e.position[1]);
    const span = Math.max(1e-9, Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys));
    return { x0: (Math.max(...xs) + Math.min(...xs)) / 2, y0: (Math.max(...ys) + Math.min(...ys)) / 2, scale: (this.W - 2 * this.pad - 80) / span };
  });
  protected readonly cx = computed(() => this.W / 2);
  protected readonly points = computed(() => {
    const f = this.frame();
    return this.elements().map((e, n) => ({ n, excluded: e.excluded, x: this.W / 2 + (e.position[0] - f.x0) * f.scale, y: this.H / 2 - (e.position[1] - f.y0) * f.scale }));
  });
}

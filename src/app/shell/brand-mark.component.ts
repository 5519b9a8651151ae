import { ChangeDetectionStrategy, Component } from '@angular/core';

/**
 * Nullsmith's mark: a beam pattern with a steered-in null (the sharp notch) above a row of
 * four array elements. Drawn inline so it needs no asset request; the favicon is the same art.
 */
@Component({
  selector: 'ns-brand-mark',
  template: `
    <svg viewBox="0 0 32 32" width="32" height="32" aria-hidden="true" focusable="false">
      <rect width="32" height="32" rx="7" class="tile" />
      <path
        class="pattern"
        d="M4.5 19.5C7 12 9.5 6.5 12 6.5s4.2 6.5 6 14.5c1.2-4.8 2.6-7.5 4.2-7.5 1.7 0 3.2 3 5.3 6"
      />
      <g class="elements">
        <circle cx="8" cy="25.5" r="1.6" />
        <circle cx="13.3" cy="25.5" r="1.6" />
        <circle cx="18.7" cy="25.5" r="1.6" />
        <circle cx="24" cy="25.5" r="1.6" />
      </g>
    </svg>
  `,
  styles: `
    :host {
      display: inline-flex;
    }
    .tile {
      fill: var(--mat-sys-primary);
    }
    .pattern {
      fill: none;
      stroke: var(--ns-signal);
      stroke-width: 2.2;
      stroke-linecap: round;
      stroke-linejoin: round;
    }
    .elements {
      fill: var(--mat-sys-on-primary);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BrandMarkComponent {}

import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/**
 * The honest "nothing here yet" panel of a list page: an icon, a headline, one or two
 * sentences on how items arrive, and projected actions (buttons, links).
 */
@Component({
  selector: 'ns-empty-state',
  imports: [MatIconModule],
  template: `
    <mat-icon class="glyph" aria-hidden="true">{{ icon() }}</mat-icon>
    <h2 class="headline">{{ headline() }}</h2>
    <p class="explain"><ng-content /></p>
    <div class="actions"><ng-content select="[nsEmptyStateAction]" /></div>
  `,
  styles: `
    :host {
      display: flex;
      flex-direction: column;
      align-items: center;
      text-align: center;
      gap: 8px;
      padding: 56px 24px;
      border: 1px dashed var(--mat-sys-outline-variant);
      border-radius: 16px;
      background: var(--mat-sys-surface-container-low);
    }
    .glyph {
      width: 56px;
      height: 56px;
      font-size: 32px;
      line-height: 56px;
      border-radius: 50%;
      color: var(--mat-sys-on-secondary-container);
      background: var(--mat-sys-secondary-container);
    }
    .headline {
      margin: 8px 0 0;
      font: var(--mat-sys-title-medium);
      color: var(--mat-sys-on-surface);
    }
    .explain {
      max-width: 56ch;
      margin: 0;
      color: var(--mat-sys-on-surface-variant);
    }
    .actions:empty {
      display: none;
    }
    .actions {
      margin-top: 8px;
      display: flex;
      gap: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EmptyStateComponent {
  readonly icon = input.required<string>();
  readonly headline = input.required<string>();
}

import { ChangeDetectionStrategy, Component, input } from '@angular/core';

/** Title row of a feature page: heading, one line of purpose, and projected actions on the right. */
@Component({
  selector: 'ns-page-header',
  template: `
    <div class="text">
      <h1 class="title">{{ heading() }}</h1>
      @if (summary()) {
        <p class="summary">{{ summary() }}</p>
      }
    </div>
    <div class="actions"><ng-content /></div>
  `,
  styles: `
    :host {
      display: flex;
      align-items: flex-end;
      justify-content: space-between;
      gap: 16px;
      flex-wrap: wrap;
      margin-bottom: 24px;
    }
    .title {
      margin: 0;
      font: var(--mat-sys-headline-small);
      color: var(--mat-sys-on-surface);
    }
    .summary {
      margin: 4px 0 0;
      color: var(--mat-sys-on-surface-variant);
    }
    .actions {
      display: flex;
      gap: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PageHeaderComponent {
  readonly heading = input.required<string>();
  readonly summary = input<string>('');
}

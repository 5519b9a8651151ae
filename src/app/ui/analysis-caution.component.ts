import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** Shown under every signed-in page: results inform people, they do not decide for them. */
export const ANALYSIS_CAUTION =
  'Nullsmith outputs are analysis aids. Decisions on navigation, safety or environmental mitigation ' +
  'need review by a qualified analyst and must follow local rules.';

@Component({
  selector: 'ns-analysis-caution',
  imports: [MatIconModule],
  template: `<mat-icon aria-hidden="true">info</mat-icon><span>{{ text }}</span>`,
  styles: `
    :host {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    mat-icon {
      flex: none;
      width: 18px;
      height: 18px;
      font-size: 18px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AnalysisCautionComponent {
  protected readonly text = ANALYSIS_CAUTION;
}

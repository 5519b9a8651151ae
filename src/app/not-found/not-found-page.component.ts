import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { EmptyStateComponent } from '../ui/empty-state.component';

/** Any unknown path inside the signed-in shell. */
@Component({
  selector: 'ns-not-found-page',
  imports: [EmptyStateComponent, MatButtonModule, RouterLink],
  template: `
    <ns-empty-state icon="explore_off" headline="There is no page at this address">
      The link may be old or mistyped. Jobs, recordings and arrays are reachable from the menu.
      <a mat-flat-button nsEmptyStateAction routerLink="/jobs">Go to jobs</a>
    </ns-empty-state>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFoundPageComponent {}

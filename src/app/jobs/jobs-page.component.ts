import { ChangeDetectionStrategy, Component } from '@angular/core';
import { EmptyStateComponent } from '../ui/empty-state.component';
import { PageHeaderComponent } from '../ui/page-header.component';

/** /jobs: Beamforming runs: queued, running and finished, with live progress. */
@Component({
  selector: 'ns-jobs-page',
  imports: [EmptyStateComponent, PageHeaderComponent],
  template: `
    <ns-page-header heading="Jobs" summary="Beamforming runs: queued, running and finished, with live progress." />
    <ns-empty-state icon="radar" headline="No jobs yet">
      A job beamforms one recording with one array description over a fan of look directions. Jobs queued by your team appear here and update while they run.
    </ns-empty-state>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class JobsPageComponent {}

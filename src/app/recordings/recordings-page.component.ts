import { ChangeDetectionStrategy, Component } from '@angular/core';
import { EmptyStateComponent } from '../ui/empty-state.component';
import { PageHeaderComponent } from '../ui/page-header.component';

/** /recordings: Multichannel recordings from your arrays, ready to beamform. */
@Component({
  selector: 'ns-recordings-page',
  imports: [EmptyStateComponent, PageHeaderComponent],
  template: `
    <ns-page-header heading="Recordings" summary="Multichannel recordings from your arrays, ready to beamform." />
    <ns-empty-state icon="upload_file" headline="No recordings yet">
      Multichannel WAV, RF64 and SigMF recordings will be listed here with their channel count, sample rate and length once they have been uploaded and checked.
    </ns-empty-state>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RecordingsPageComponent {}

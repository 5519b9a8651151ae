import { ChangeDetectionStrategy, Component } from '@angular/core';
import { EmptyStateComponent } from '../ui/empty-state.component';
import { PageHeaderComponent } from '../ui/page-header.component';

/** /arrays: Element positions and orientation of each array you record with. */
@Component({
  selector: 'ns-arrays-page',
  imports: [EmptyStateComponent, PageHeaderComponent],
  template: `
    <ns-page-header heading="Arrays" summary="Element positions and orientation of each array you record with." />
    <ns-empty-state icon="scatter_plot" headline="No array descriptions yet">
      An array description gives every element's position in metres and the array's heading. Jobs need one to turn channel delays into look directions.
    </ns-empty-state>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ArraysPageComponent {}

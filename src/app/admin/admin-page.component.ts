import { ChangeDetectionStrategy, Component } from '@angular/core';
import { EmptyStateComponent } from '../ui/empty-state.component';
import { PageHeaderComponent } from '../ui/page-header.component';

/** /admin: Accounts, roles and the machines that run jobs. */
@Component({
  selector: 'ns-admin-page',
  imports: [EmptyStateComponent, PageHeaderComponent],
  template: `
    <ns-page-header heading="Admin" summary="Accounts, roles and the machines that run jobs." />
    <ns-empty-state icon="admin_panel_settings" headline="Nothing to administer yet">
      Account and role management, compute node status and the mail outbox will appear here.
    </ns-empty-state>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminPageComponent {}

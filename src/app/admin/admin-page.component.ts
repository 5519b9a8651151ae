import { ChangeDetectionStrategy, Component } from '@angular/core';
import { PageHeaderComponent } from '../ui/page-header.component';
import { AdminTabsComponent } from './admin-tabs.component';
import { UserListComponent } from './user-list.component';

/** /admin (admin role): accounts; the tabs lead to settings, the outbox and the audit log. */
@Component({
  selector: 'ns-admin-page',
  imports: [PageHeaderComponent, AdminTabsComponent, UserListComponent],
  template: `
    <ns-page-header heading="Admin" summary="Accounts, roles and the machines that run jobs." />
    <ns-admin-tabs />
    <ns-user-list />
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminPageComponent {}

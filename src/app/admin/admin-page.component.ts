import { ChangeDetectionStrategy, Component } from '@angular/core';
import { PageHeaderComponent } from '../ui/page-header.component';
import { UserListComponent } from './user-list.component';

/** /admin (admin role): accounts now; compute nodes and the mail outbox join them here. */
@Component({
  selector: 'ns-admin-page',
  imports: [PageHeaderComponent, UserListComponent],
  template: `
    <ns-page-header heading="Admin" summary="Accounts, roles and the machines that run jobs." />
    <ns-user-list />
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminPageComponent {}

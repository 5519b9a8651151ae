import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink, RouterLinkActive } from '@angular/router';

/** The strip of admin sections above each admin page. */
@Component({
  selector: 'ns-admin-tabs',
  imports: [MatTabsModule, RouterLink, RouterLinkActive],
  template: `
    <nav mat-tab-nav-bar [tabPanel]="panel" aria-label="Admin sections">
      @for (t of tabs; track t.path) {
        <a mat-tab-link [routerLink]="t.path" routerLinkActive #rla="routerLinkActive" [routerLinkActiveOptions]="{ exact: true }" [active]="rla.isActive">{{ t.label }}</a>
      }
    </nav>
    <mat-tab-nav-panel #panel />
  `,
  styles: `
    :host {
      display: block;
      margin-bottom: 20px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AdminTabsComponent {
  protected readonly tabs = [
    { label: 'Accounts', path: '/admin' },
    { label: 'Settings', path: '/admin/settings' },
    { label: 'Outbox', path: '/admin/outbox' },
    { label: 'Audit log', path: '/audit' },
  ];
}

import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { profileSchema } from '../../../shared/api/profile.js';
import { PANEL_STYLES } from '../admin/panel.styles';
import { ApiService } from '../core/api.service';
import { ROLE_LABELS } from '../shell/role-label';
import { PageHeaderComponent } from '../ui/page-header.component';
import { TokenListComponent } from './token-list.component';

/** /profile: who you are, which mail you get, and your API tokens. */
@Component({
  selector: 'ns-profile-page',
  imports: [MatSlideToggleModule, PageHeaderComponent, TokenListComponent],
  template: `
    <ns-page-header heading="Profile" summary="Your mail and your tokens for scripts." />
    @if (profile.hasValue()) {
      <section class="panel" aria-labelledby="mail-title">
        <header class="panel-head">
          <h2 id="mail-title">{{ profile.value().displayName }}</h2>
          <span class="mono">{{ profile.value().email }}</span> · {{ roleLabel(profile.value().role) }}
        </header>
        <div class="panel-body">
          <p class="hint">You always get a message when one of your jobs succeeds, fails or is cancelled.</p>
          <mat-slide-toggle [checked]="profile.value().dailyDigest" (change)="setDigest($event.checked)">
            Morning digest: one message listing the jobs that ended overnight
          </mat-slide-toggle>
        </div>
      </section>
    }
    <ns-token-list />
  `,
  styles: PANEL_STYLES,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProfilePageComponent {
  private readonly api = inject(ApiService);
  protected readonly profile = rxResource({ stream: () => this.api.get('/api/profile', profileSchema) });

  protected roleLabel(role: string): string {
    return ROLE_LABELS[role as keyof typeof ROLE_LABELS] ?? role;
  }

  protected setDigest(on: boolean): void {
    this.api.patch('/api/profile', { dailyDigest: on }, profileSchema).subscribe({
      next: (p) => this.profile.set(p),
      error: () => this.profile.reload(),
    });
  }
}

import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import { LiveService } from './live.service';

/** A small badge: green dot while live updates flow, an amber warning while they are down. */
@Component({
  selector: 'ns-live-indicator',
  imports: [MatIconModule, MatTooltipModule],
  template: `
    <span class="badge" [class]="live.status()" [matTooltip]="tip()" role="status" data-testid="live-indicator" [attr.data-status]="live.status()">
      @if (live.status() === 'live') {
        <span class="dot" aria-hidden="true"></span>
        Live
      } @else {
        <mat-icon aria-hidden="true">{{ live.status() === 'down' ? 'sync_problem' : 'sync' }}</mat-icon>
        {{ live.status() === 'down' ? 'Live updates down: retrying' : 'Connecting' }}
      }
    </span>
  `,
  styles: `
    .badge {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 2px 10px;
      border-radius: 999px;
      font: var(--mat-sys-label-medium);
      background: var(--mat-sys-surface-container-high);
      color: var(--mat-sys-on-surface-variant);
    }
    .badge.down {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
    .dot {
      width: 8px;
      height: 8px;
      border-radius: 50%;
      background: #2e9d6a;
      box-shadow: 0 0 0 3px color-mix(in srgb, #2e9d6a 25%, transparent);
    }
    mat-icon {
      width: 16px;
      height: 16px;
      font-size: 16px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LiveIndicatorComponent {
  protected readonly live = inject(LiveService);
  protected readonly tip = computed(() =>
    this.live.status() === 'live'
      ? 'Progress and state changes arrive as they happen.'
      : 'The page shows the last known state; it reloads everything when the connection returns.',
  );
}

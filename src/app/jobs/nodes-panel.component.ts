import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSnackBar } from '@angular/material/snack-bar';
import { filter, firstValueFrom, interval } from 'rxjs';
import type { WorkerNode } from '../../../shared/api/jobs.js';
import { ApiService } from '../core/api.service';
import { LiveService } from '../core/live.service';
import { ConfirmDialogComponent, type ConfirmData } from './confirm-dialog.component';
import { drainAnswerSchema, nodesSchema } from './jobs-api';

interface NodeView extends WorkerNode {
  receivedAt: number;
}

/** Operations view of the worker nodes: heartbeat age, current jobs, windows per second, drain. */
@Component({
  selector: 'ns-nodes-panel',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <h2 class="title">Worker nodes</h2>
    @if (!nodes().length) {
      <p class="muted">No node has reported yet.</p>
    }
    <div class="grid">
      @for (n of nodes(); track n.id) {
        <section class="node" [class.lost]="!alive(n)" [attr.data-node]="n.id">
          <header>
            <mat-icon aria-hidden="true">{{ !alive(n) ? 'cloud_off' : n.draining ? 'hourglass_bottom' : 'memory' }}</mat-icon>
            <span class="host">{{ n.host }}<span class="muted"> · {{ n.kind }} · pid {{ n.pid }}</span></span>
          </header>
          <dl>
            <dt>Heartbeat</dt>
            <dd class="num">{{ age(n) }} s ago{{ alive(n) ? '' : ' (lost)' }}</dd>
            <dt>Running</dt>
            <dd>{{ n.currentJobIds.length ? 'job ' + n.currentJobIds.join(', ') : 'idle' }} <span class="muted">/ {{ n.concurrency }} slot(s)</span></dd>
            <dt>Rate</dt>
            <dd class="num">{{ n.windowsPerSecond.toFixed(1) }} windows/s</dd>
          </dl>
          @if (alive(n)) {
            <button mat-stroked-button type="button" (click)="toggleDrain(n)" [attr.data-testid]="'drain-' + n.id">
              <mat-icon>{{ n.draining ? 'play_arrow' : 'pan_tool' }}</mat-icon>
              {{ n.draining ? 'Resume claiming' : 'Drain' }}
            </button>
          }
        </section>
      }
    </div>
  `,
  styles: `
    .title { font: var(--mat-sys-title-medium); margin: 0 0 12px; }
    .grid { display: grid; grid-template-columns: repeat(auto-fill, minmax(260px, 1fr)); gap: 12px; }
    .node { padding: 12px 16px; border-radius: 12px; background: var(--mat-sys-surface-container); }
    .node.lost { background: var(--mat-sys-error-container); }
    header { display: flex; align-items: center; gap: 8px; font: var(--mat-sys-title-small); }
    .host { overflow: hidden; text-overflow: ellipsis; white-space: nowrap; }
    dl { display: grid; grid-template-columns: auto 1fr; gap: 2px 12px; margin: 8px 0; }
    dt { color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; }
    .muted { color: var(--mat-sys-on-surface-variant); font-weight: normal; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NodesPanelComponent {
  private readonly api = inject(ApiService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly now = signal(Date.now());
  private readonly byId = signal(new Map<string, NodeView>());
  protected readonly nodes = computed(() => [...this.byId().values()].sort((a, b) => a.host.localeCompare(b.host) || a.id.localeCompare(b.id)));

  constructor() {
    const live = inject(LiveService);
    const destroy = inject(DestroyRef);
    interval(1000).pipe(takeUntilDestroyed(destroy)).subscribe(() => this.now.set(Date.now()));
    live
      .watch(['nodes'])
      .pipe(takeUntilDestroyed(destroy))
      .subscribe((m) => {
        if (m.type === 'node') this.put([m.node]);
      });
    live.opened$.pipe(takeUntilDestroyed(destroy)).subscribe(() => void this.reload());
    void this.reload();
    // a node that stops reporting must age visibly, so the panel also refreshes slowly by itself
    interval(15_000)
      .pipe(
        takeUntilDestroyed(destroy),
        filter(() => live.status() !== 'live'),
      )
      .subscribe(() => void this.reload());
  }

  protected age(n: NodeView): number {
    return Math.max(0, Math.round(n.heartbeatAgeS + (this.now() - n.receivedAt) / 1000));
  }

  protected alive(n: NodeView): boolean {
    return n.alive && this.age(n) < 15;
  }

  protected async toggleDrain(n: NodeView): Promise<void> {
    if (!n.draining) {
      const data: ConfirmData = {
        title: `Drain ${n.host}?`,
        body: 'The node finishes the jobs it is running and claims no new ones until you resume it. Queued jobs wait for other nodes.',
        confirm: 'Drain node',
      };
      const ok = await firstValueFrom(this.dialog.open(ConfirmDialogComponent, { data }).afterClosed());
      if (!ok) return;
    }
    const r = await firstValueFrom(this.api.post(`/api/workers/${encodeURIComponent(n.id)}/drain`, { draining: !n.draining }, drainAnswerSchema));
    this.snack.open(r.message, 'OK', { duration: 5000 });
    await this.reload();
  }

  private async reload(): Promise<void> {
    const { nodes } = await firstValueFrom(this.api.get('/api/workers', nodesSchema));
    this.byId.set(new Map());
    this.put(nodes);
  }

  private put(list: WorkerNode[]): void {
    const next = new Map(this.byId());
    for (const n of list) next.set(n.id, { ...n, receivedAt: Date.now() });
    this.byId.set(next);
  }
}

import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatTableModule } from '@angular/material/table';
import type { WindowRow } from '../../../shared/api/results.js';

/** One row per window: time span, loudest bearing, best SINR, eigenvalues above the noise band. */
@Component({
  selector: 'ns-window-table',
  imports: [MatPaginatorModule, MatTableModule],
  template: `
    <table mat-table [dataSource]="page()" class="num">
      <ng-container matColumnDef="window"><th mat-header-cell *matHeaderCellDef>Window</th><td mat-cell *matCellDef="let r">{{ r.window }}</td></ng-container>
      <ng-container matColumnDef="span"><th mat-header-cell *matHeaderCellDef>Time (s)</th><td mat-cell *matCellDef="let r">{{ r.tStartS.toFixed(3) }}–{{ r.tEndS.toFixed(3) }}</td></ng-container>
      <ng-container matColumnDef="peak"><th mat-header-cell *matHeaderCellDef>Loudest bearing</th><td mat-cell *matCellDef="let r">{{ r.peakAzimuthDeg === null ? '–' : r.peakAzimuthDeg + '°' }}</td></ng-container>
      <ng-container matColumnDef="power"><th mat-header-cell *matHeaderCellDef>Power (dB)</th><td mat-cell *matCellDef="let r">{{ r.peakPowerDb ?? '–' }}</td></ng-container>
      <ng-container matColumnDef="sinr"><th mat-header-cell *matHeaderCellDef>Best SINR (dB)</th><td mat-cell *matCellDef="let r">{{ r.bestSinrDb === null ? 'not estimated' : r.bestSinrDb + ' at ' + r.bestSinrAzimuthDeg + '°' }}</td></ng-container>
      <ng-container matColumnDef="above"><th mat-header-cell *matHeaderCellDef>Eigenvalues above noise</th><td mat-cell *matCellDef="let r">{{ r.maxAboveEdge }}</td></ng-container>
      <ng-container matColumnDef="singular"><th mat-header-cell *matHeaderCellDef>Singular bins</th><td mat-cell *matCellDef="let r">{{ r.singularBins }}</td></ng-container>
      <tr mat-header-row *matHeaderRowDef="columns"></tr>
      <tr mat-row *matRowDef="let r; columns: columns" (click)="windowPicked.emit(r.window)" class="row"></tr>
    </table>
    <mat-paginator [length]="rows().length" [pageIndex]="index()" [pageSize]="size()" [pageSizeOptions]="[10, 25, 100]" (page)="onPage($event)" aria-label="Pages of windows" />
  `,
  styles: `
    table { width: 100%; }
    .row { cursor: pointer; }
    .row:hover { background: var(--mat-sys-surface-container); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WindowTableComponent {
  readonly rows = input.required<WindowRow[]>();
  readonly windowPicked = output<number>();
  protected readonly columns = ['window', 'span', 'peak', 'power', 'sinr', 'above', 'singular'];
  protected readonly index = signal(0);
  protected readonly size = signal(10);
  protected readonly page = computed(() => this.rows().slice(this.index() * this.size(), (this.index() + 1) * this.size()));

  protected onPage(e: PageEvent): void {
    this.index.set(e.pageIndex);
    this.size.set(e.pageSize);
  }
}

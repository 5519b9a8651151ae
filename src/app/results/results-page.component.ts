import { HttpContext } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import { EMPTY, Subject, catchError, firstValueFrom, of, throttleTime } from 'rxjs';
import type { JobDto } from '../../../shared/api/jobs.js';
import type { WindowSummaryDto } from '../../../shared/api/live.js';
import { beamWeightsSchema, eigenSpectrumSchema, runInfoSchema, windowTableSchema, windowsPageSchema, type RunInfo } from '../../../shared/api/results.js';
import { RESULTS_CAUTION } from '../../../shared/params/result-caution.js';
import { azimuthGrid, beamPattern, conventionalWeights, findNulls } from '../../../shared/plots/beam-pattern.js';
import { ApiService } from '../core/api.service';
import { CALLER_HANDLES_ERRORS } from '../core/http-context';
import { LiveIndicatorComponent } from '../core/live-indicator.component';
import { LiveService } from '../core/live.service';
import { STATE_LOOK, formatDuration, progressPercent } from '../jobs/job-format';
import { jobDetailSchema } from '../jobs/jobs-api';
import { BearingTimeMapComponent } from './bearing-time-map.component';
import { DownloadsPanelComponent } from './downloads-panel.component';
import { LinePlotComponent, type PlotSpec } from './line-plot.component';
import { PLOT_COLOURS } from './plot-canvas';
import { mergeWindows, toDb, windowLabel } from './results-data';
import { RunInfoPanelComponent } from './run-info-panel.component';
import { WindowTableComponent } from './window-table.component';

const quiet = () => ({ context: new HttpContext().set(CALLER_HANDLES_ERRORS, true) });
const TRACK_COLOURS = ['#0b6e8a', '#b5651d', '#6b4fa0', '#2e7d32', '#ad1457', '#455a64'];
/** Windows fetched per plot-data call (the server's limit). */
const PAGE = 2000;

/** /jobs/:id: the results of one job, live while it runs. */
@Component({
  selector: 'ns-results-page',
  imports: [
    BearingTimeMapComponent,
    DownloadsPanelComponent,
    FormsModule,
    LinePlotComponent,
    LiveIndicatorComponent,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    MatSelectModule,
    RouterLink,
    RunInfoPanelComponent,
    WindowTableComponent,
  ],
  templateUrl: './results-page.component.html',
  styleUrl: './results-page.component.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResultsPageComponent {
  /** Route parameter (component input binding). */
  readonly id = input.required<string>();

  private readonly api = inject(ApiService);
  private readonly live = inject(LiveService);
  private readonly snack = inject(MatSnackBar);
  private readonly destroy = inject(DestroyRef);

  protected readonly caution = RESULTS_CAUTION;
  protected readonly look = STATE_LOOK;
  protected readonly progressPercent = progressPercent;
  protected readonly formatDuration = formatDuration;
  protected readonly windowLabel = windowLabel;

  protected readonly job = signal<JobDto | null>(null);
  protected readonly run = signal<RunInfo | null>(null);
  protected readonly windows = signal<WindowSummaryDto[]>([]);
  protected readonly loadError = signal('');
  protected readonly selectedWindow = signal<number | null>(null);
  protected readonly selectedBin = signal(0);
  protected readonly selectedBeam = signal<number | null>(null);
  protected readonly trackBeams = signal<number[]>([]);
  private readonly tableRefresh = new Subject<void>();
  protected readonly tableVersion = signal(0);

  protected readonly jobId = computed(() => Number(this.id()));
  protected readonly azimuths = computed(() => this.run()?.setup.azimuthsDeg ?? []);
  protected readonly savedBeams = computed(() => this.run()?.setup.savedBeams ?? []);
  protected readonly window = computed(() => {
    const list = this.windows();
    const sel = this.selectedWindow();
    return sel === null ? list[list.length - 1] : (list.find((w) => w.window === sel) ?? list[list.length - 1]);
  });
  protected readonly fileStem = computed(() => `nullsmith-job-${this.jobId()}`);

  protected readonly sinrSpec = computed<PlotSpec>(() => {
    const list = this.windows();
    const az = this.azimuths();
    const xs = list.map((w) => (w.tStartS + w.tEndS) / 2);
    const series = this.trackBeams().map((b, i) => ({
      label: `${az[b]}°`,
      xs,
      ys: list.map((w) => w.sinrDb[b]),
      colour: TRACK_COLOURS[i % TRACK_COLOURS.length],
    }));
    const w = this.window();
    return { series, xTitle: 'Time (s, window centre)', yTitle: 'Broadband SINR (dB)', xMarks: w ? [{ x: (w.tStartS + w.tEndS) / 2 }] : [] };
  });
  protected readonly hasSinr = computed(() => this.windows().some((w) => this.trackBeams().some((b) => w.sinrDb[b] !== null)));

  protected readonly eigen = rxResource({
    params: () => {
      const w = this.window();
      return w && this.run() ? { id: this.jobId(), window: w.window, bin: this.selectedBin() } : undefined;
    },
    stream: ({ params }) => this.api.get(`/api/plots/${params.id}/eigen`, eigenSpectrumSchema, { params: { window: params.window, bin: params.bin } }),
  });
  protected readonly eigenSpec = computed<PlotSpec | null>(() => {
    const e = this.eigen.value();
    if (!e) return null;
    const ranks = e.eigenvalues.map((_, i) => i + 1);
    return {
      series: [{ label: 'Eigenvalues of R̂', xs: ranks, ys: e.eigenvalues.map(toDb), colour: PLOT_COLOURS.adaptive, dots: true }],
      xTitle: 'Rank (largest first)',
      yTitle: 'Eigenvalue (dB)',
      yBand: e.mpLower > 0 ? { y0: 10 * Math.log10(e.mpLower), y1: 10 * Math.log10(e.mpUpper), label: `Noise band (Marchenko–Pastur, N/K = ${(e.n / e.k).toFixed(2)})` } : undefined,
      xRange: [0.5, e.n + 0.5],
    };
  });

  protected readonly weights = rxResource({
    params: () => {
      const w = this.window();
      const beam = this.selectedBeam();
      return w && beam !== null && this.run() ? { id: this.jobId(), window: w.window, bin: this.selectedBin(), beam } : undefined;
    },
    stream: ({ params }) =>
      this.api.get(`/api/plots/${params.id}/weights`, beamWeightsSchema, { params: { window: params.window, bin: params.bin, beam: params.beam } }),
  });
  protected readonly pattern = computed(() => {
    const w = this.weights.value();
    if (!w) return null;
    const grid = azimuthGrid(-90, 90, 0.25);
    const adapted = beamPattern(w, grid);
    const conv = beamPattern({ ...w, weights: conventionalWeights(w, w.azimuthDeg) }, grid);
    const db = (p: Float64Array) => Float64Array.from(p, (x) => 10 * Math.log10(Math.max(x, 1e-12)));
    const a = db(adapted);
    const nulls = findNulls(a, 25).map((i) => grid[i]);
    const spec: PlotSpec = {
      series: [
        { label: 'Adapted', xs: grid, ys: a, colour: PLOT_COLOURS.adaptive },
        { label: 'Conventional', xs: grid, ys: db(conv), colour: PLOT_COLOURS.conventional, dash: [5, 4] },
      ],
      xTitle: 'Azimuth (°)',
      yTitle: 'Response |wᴴv|² (dB)',
      yFloor: -60,
      xMarks: [{ x: w.azimuthDeg, label: 'look' }, ...nulls.map((x) => ({ x, colour: '#8a99a3' }))],
    };
    return { spec, nulls, freqHz: w.freqHz, look: w.azimuthDeg };
  });

  protected readonly table = rxResource({
    params: () => (this.run() ? { id: this.jobId(), n: this.tableVersion() } : undefined),
    stream: ({ params }) => {
      const stored = this.windows().length;
      const stride = Math.max(1, Math.ceil(stored / PAGE));
      return this.api.get(`/api/plots/${params.id}/table`, windowTableSchema, { params: { stride } }).pipe(catchError(() => of({ windowsStored: 0, rows: [] })));
    },
  });

  constructor() {
    this.tableRefresh.pipe(throttleTime(3000, undefined, { leading: true, trailing: true }), takeUntilDestroyed(this.destroy)).subscribe(() => this.tableVersion.update((v) => v + 1));
    effect((onCleanup) => {
      const id = this.jobId();
      // Only the job id drives this effect: the subscription itself reads the live status.
      untracked(() => this.follow(id, onCleanup));
    });
  }

  private follow(id: number, onCleanup: (fn: () => void) => void): void {
    {
      const sub = this.live.watch([`job:${id}`], { [`job:${id}`]: 0 }).subscribe((m) => {
        if (m.type === 'job' && m.job.id === id) this.onJob(m.job);
        if (m.type === 'windows' && m.jobId === id) this.addWindows(m.windows);
      });
      const resync = this.live.opened$.subscribe(() => void this.load(id));
      void this.load(id);
      onCleanup(() => {
        sub.unsubscribe();
        resync.unsubscribe();
      });
    }
  }

  protected pickWindow(w: number): void {
    this.selectedWindow.set(w);
  }

  protected setTrackBeams(list: number[]): void {
    this.trackBeams.set(list.slice(0, 6));
  }

  protected nullsText(): string {
    const p = this.pattern();
    return p && p.nulls.length ? p.nulls.map((x) => `${x.toFixed(1)}°`).join(', ') : 'none deeper than 25 dB';
  }

  private onJob(job: JobDto): void {
    const before = this.job();
    this.job.set(job);
    if (!this.run() && job.checkpointWindow > 0) void this.loadRun(job.id);
    if (before && before.state !== job.state) this.tableRefresh.next();
  }

  private addWindows(list: WindowSummaryDto[]): void {
    this.windows.update((have) => mergeWindows(have, list));
    this.live.setFromWindow(`job:${this.jobId()}`, this.windows().length);
    this.tableRefresh.next();
  }

  /** Full (re)load from REST: the job, the run description and any windows not yet here. */
  private async load(id: number): Promise<void> {
    try {
      const { job } = await firstValueFrom(this.api.get(`/api/jobs/${id}`, jobDetailSchema, quiet()));
      this.job.set(job);
      this.loadError.set('');
      if (job.checkpointWindow > 0) await this.loadRun(id);
      while (this.run() && this.windows().length < (this.job()?.checkpointWindow ?? 0) && this.windows().length < 20 * PAGE) {
        const from = this.windows().length;
        const page = await firstValueFrom(this.api.get(`/api/plots/${id}/windows`, windowsPageSchema, { params: { fromWindow: from, toWindow: from + PAGE - 1 } }));
        if (!page.windows.length) break;
        this.addWindows(page.windows);
      }
    } catch (e) {
      const msg = (e as { error?: { error?: { message?: string } } }).error?.error?.message;
      this.loadError.set(msg ?? `Job ${id} could not be loaded; check the address or go back to the jobs list.`);
    }
  }

  private async loadRun(id: number): Promise<void> {
    if (this.run()) return;
    const run = await firstValueFrom(this.api.get(`/api/plots/${id}/run`, runInfoSchema, quiet()).pipe(catchError(() => EMPTY)), { defaultValue: null });
    if (!run || this.run()) return;
    this.run.set(run);
    this.selectedBin.set(Math.floor(run.setup.bins.length / 2));
    const saved = run.setup.savedBeams;
    this.selectedBeam.set(saved[0] ?? null);
    this.trackBeams.set(saved.length ? saved.slice(0, 4) : [Math.floor(run.setup.azimuthsDeg.length / 2)]);
  }

  protected async copyRun(): Promise<void> {
    const r = this.run();
    if (!r) return;
    await navigator.clipboard.writeText(JSON.stringify(r, null, 2));
    this.snack.open('Run description copied as JSON.', 'OK', { duration: 3000 });
  }
}

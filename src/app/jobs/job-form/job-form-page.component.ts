import { HttpContext, HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom, startWith } from 'rxjs';
import type { ArrayRecord } from '../../../../shared/api/arrays.js';
import { submitJobSchema } from '../../../../shared/api/jobs.js';
import type { RecordingDetail, RecordingSummary } from '../../../../shared/api/recordings.js';
import { parseBeamformParams, type ParamsProblem } from '../../../../shared/params/beamform-params.js';
import { validateParamsAgainstRecording, type RecordingInfo } from '../../../../shared/params/validate-against-recording.js';
import { ApiService } from '../../core/api.service';
import { CALLER_HANDLES_ERRORS } from '../../core/http-context';
import { PageHeaderComponent } from '../../ui/page-header.component';
import { submitBatchResponseSchema } from '../../../../shared/api/job-batches.js';
import { archiveRootsSchema, arrayListSchema, recordingListSchema, submitAnswerSchema, type ArchiveRootChoice } from '../jobs-api';
import { AdvisorPanelComponent } from './advisor-panel.component';
import { batchSelection } from './batch-selection';
import { adviseJob } from './job-advice';
import * as z from 'zod';

const NFFTS = [64, 128, 256, 512, 1024, 2048, 4096, 8192, 16384];
const recordingDetailSchema = z.custom<RecordingDetail>((v) => typeof v === 'object' && v !== null && 'id' in v);

/** /jobs/new: the job form, checked by the server's own schema, with the advisor beside it. */
@Component({
  selector: 'ns-job-form-page',
  imports: [AdvisorPanelComponent, MatButtonModule, MatButtonToggleModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, PageHeaderComponent, ReactiveFormsModule, RouterLink],
  templateUrl: './job-form-page.component.html',
  styleUrl: './job-form-page.component.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class JobFormPageComponent {
  private readonly api = inject(ApiService);
  private readonly router = inject(Router);
  private readonly snack = inject(MatSnackBar);

  protected readonly nffts = NFFTS;
  protected readonly form = new FormGroup({
    name: new FormControl('', { nonNullable: true }),
    recordingId: new FormControl<number | null>(null),
    /** 'list': the recording plus any further ones (a batch when there are any); 'folder': an archive folder. */
    runOn: new FormControl<'list' | 'folder'>('list', { nonNullable: true }),
    /** Further recordings: when any are chosen, the form submits a batch (one job per recording). */
    extraRecordingIds: new FormControl<number[]>([], { nonNullable: true }),
    archiveRootId: new FormControl<number | null>(null),
    archiveFolder: new FormControl('', { nonNullable: true }),
    archivePattern: new FormControl('*.wav', { nonNullable: true }),
    archiveRecursive: new FormControl(false, { nonNullable: true }),
    arrayId: new FormControl<number | null>(null),
    fLoHz: new FormControl(150, { nonNullable: true }),
    fHiHz: new FormControl(1400, { nonNullable: true }),
    nfft: new FormControl(256, { nonNullable: true }),
    hop: new FormControl(128, { nonNullable: true }),
    snapshots: new FormControl(32, { nonNullable: true }),
    windowHop: new FormControl(2, { nonNullable: true }),
    loadingKind: new FormControl<'none' | 'trace' | 'noise-floor' | 'ledoit-wolf' | 'wng-floor'>('noise-floor', { nonNullable: true }),
    loadingDb: new FormControl(3, { nonNullable: true }),
    beamformer: new FormControl<'mpdr' | 'mvdr' | 'conventional'>('mpdr', { nonNullable: true }),
    trainStartS: new FormControl(0, { nonNullable: true }),
    trainEndS: new FormControl(1, { nonNullable: true }),
    azFrom: new FormControl(-90, { nonNullable: true }),
    azTo: new FormControl(90, { nonNullable: true }),
    azStep: new FormControl(1, { nonNullable: true }),
    savedBeams: new FormControl('', { nonNullable: true }),
    priority: new FormControl(0, { nonNullable: true }),
    startAfter: new FormControl('', { nonNullable: true }),
  });
  protected readonly maxOutputMb = signal(Number(localStorage.getItem('ns.maxOutputMb') ?? 500) || 500);

  protected readonly recordings = signal<RecordingSummary[]>([]);
  protected readonly arrays = signal<ArrayRecord[]>([]);
  protected readonly archiveRoots = signal<ArchiveRootChoice[]>([]);
  protected readonly recording = signal<RecordingDetail | null>(null);
  protected readonly submitting = signal(false);
  protected readonly serverProblems = signal<{ path: string; message: string }[]>([]);
  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(this.form.getRawValue())), { initialValue: this.form.getRawValue() });

  protected readonly array = computed(() => this.arrays().find((a) => a.id === this.value().arrayId) ?? null);
  protected readonly paramsResult = computed(() => parseBeamformParams(this.buildParams()));
  protected readonly recordingInfo = computed<RecordingInfo | null>(() => {
    const r = this.recording();
    if (!r || r.sampleRate === null) return null;
    return { sampleRate: r.sampleRate, totalFrames: r.sampleFrames ?? 0, complex: (r.datatype ?? '').startsWith('c'), centerFrequencyHz: 0, channels: r.channels };
  });
  /** Everything the server would refuse, with the field it concerns. */
  protected readonly problems = computed<ParamsProblem[]>(() => {
    const list: ParamsProblem[] = [];
    const v = this.value();
    if (!v.name?.trim()) list.push({ path: ['name'], message: 'Give the job a name.' });
    if (v.recordingId === null) list.push({ path: ['recordingId'], message: 'Pick a ready recording.' });
    if (v.arrayId === null) list.push({ path: ['arrayId'], message: 'Pick the array the recording was made with.' });
    if (v.runOn === 'folder' && v.archiveRootId === null) list.push({ path: ['archive'], message: 'Pick the archive folder root to run on.' });
    const pr = submitJobSchema.shape.priority.safeParse(v.priority);
    if (!pr.success) list.push({ path: ['priority'], message: pr.error.issues[0].message });
    const r = this.paramsResult();
    if (!r.ok) return [...list, ...r.problems];
    const info = this.recordingInfo();
    const a = this.array();
    if (info && a) list.push(...validateParamsAgainstRecording(r.params, info, a.geometry));
    return list;
  });
  /** The recordings part of the submission (null: one job), as the form's values stand. */
  protected readonly selection = computed(() => {
    const v = this.value();
    return batchSelection({ mode: v.runOn ?? 'list', recordingId: v.recordingId ?? null, extraRecordingIds: v.extraRecordingIds ?? [], archiveRootId: v.archiveRootId ?? null, archiveFolder: v.archiveFolder ?? '', archivePattern: v.archivePattern ?? '', archiveRecursive: v.archiveRecursive ?? false });
  });
  protected readonly advice = computed(() => {
    const r = this.paramsResult();
    const info = this.recordingInfo();
    const a = this.array();
    if (!r.ok || !info || !a) return null;
    try {
      return adviseJob(r.params, info, a.geometry, this.maxOutputMb() * 2 ** 20);
    } catch {
      return null;
    }
  });

  constructor() {
    void this.load();
    this.form.controls.recordingId.valueChanges.subscribe((id) => void this.pickRecording(id));
  }

  /** Problems of one field (by the first segments of their paths). */
  protected messagesFor(...paths: string[]): string {
    const all = [...this.problems().map((p) => ({ path: p.path.join('.'), message: p.message })), ...this.serverProblems().map((p) => ({ path: p.path.replace(/^params\./, ''), message: p.message }))];
    return all
      .filter((p) => paths.some((x) => p.path === x || p.path.startsWith(x + '.')))
      .map((p) => p.message)
      .filter((m, i, list) => list.indexOf(m) === i)
      .join(' ');
  }

  protected setMaxOutput(mb: string): void {
    const v = Number(mb);
    if (v > 0) {
      this.maxOutputMb.set(v);
      localStorage.setItem('ns.maxOutputMb', String(v));
    }
  }

  protected async submit(): Promise<void> {
    const r = this.paramsResult();
    if (this.problems().length || !r.ok) return;
    const v = this.form.getRawValue();
    const body = {
      name: v.name.trim(),
      recordingId: v.recordingId,
      arrayId: v.arrayId,
      params: this.buildParams(),
      priority: v.priority,
      ...(v.startAfter ? { runAfter: new Date(v.startAfter).toISOString() } : {}),
    };
    this.submitting.set(true);
    this.serverProblems.set([]);
    const selection = this.selection();
    try {
      if (selection) {
        const { recordingId: _example, ...shared } = body;
        const batchBody = { ...shared, ...selection };
        const answer = await firstValueFrom(this.api.post('/api/jobs/batch', batchBody, submitBatchResponseSchema, { context: new HttpContext().set(CALLER_HANDLES_ERRORS, true) }));
        this.snack.open(`Queued batch “${answer.batch.name}”: ${answer.jobs.length} jobs, ${answer.estimates.windows} windows in all.`, 'OK', { duration: 5000 });
        await this.router.navigate(['/jobs']);
        return;
      }
      const answer = await firstValueFrom(this.api.post('/api/jobs', body, submitAnswerSchema, { context: new HttpContext().set(CALLER_HANDLES_ERRORS, true) }));
      this.snack.open(`Queued “${answer.job.name}”: ${answer.estimates.windows} windows.`, 'OK', { duration: 5000 });
      await this.router.navigate(['/jobs', answer.job.id]);
    } catch (e) {
      if (e instanceof HttpErrorResponse) {
        const err = (e.error as { error?: { message?: string; details?: { problems?: { path: string; message: string }[]; recordings?: { recordingName: string | null; recordingId: number; message: string }[] } } })?.error;
        const perRecording = err?.details?.recordings?.map((r) => ({ path: 'recordingId', message: `${r.recordingName ?? `Recording ${r.recordingId}`}: ${r.message}` }));
        this.serverProblems.set(perRecording ?? err?.details?.problems ?? [{ path: '', message: err?.message ?? `The server refused the job (${e.status}).` }]);
      } else throw e;
    } finally {
      this.submitting.set(false);
    }
  }

  protected buildParams(): unknown {
    const v = this.value();
    const loading =
      v.beamformer === 'conventional' || v.loadingKind === 'none'
        ? { kind: 'none' }
        : v.loadingKind === 'ledoit-wolf'
          ? { kind: 'ledoit-wolf' }
          : v.loadingKind === 'wng-floor'
            ? { kind: 'wng-floor', minWngDb: v.loadingDb }
            : { kind: v.loadingKind, levelDb: v.loadingDb };
    const beamformer =
      v.beamformer === 'mvdr' ? { kind: 'mvdr', training: { source: 'range', startS: v.trainStartS, endS: v.trainEndS } } : { kind: v.beamformer };
    const saved = (v.savedBeams ?? '')
      .split(/[,\s]+/)
      .filter(Boolean)
      .map((s) => ({ azimuthDeg: Number(s), elevationDeg: 0 }));
    return {
      schemaVersion: 1,
      nfft: Number(v.nfft),
      hop: v.hop,
      band: { fLoHz: v.fLoHz, fHiHz: v.fHiHz },
      snapshotsPerWindow: v.snapshots,
      windowHop: v.windowHop,
      loading,
      beamformer,
      beams: { azimuthFromDeg: v.azFrom, azimuthToDeg: v.azTo, azimuthStepDeg: v.azStep, elevationsDeg: [0] },
      savedBeams: saved,
    };
  }

  private async load(): Promise<void> {
    const [recs, arrs, roots] = await Promise.all([
      firstValueFrom(this.api.get('/api/recordings', recordingListSchema, { params: { pageSize: 200, state: 'ready' } })),
      firstValueFrom(this.api.get('/api/arrays', arrayListSchema)),
      firstValueFrom(this.api.get('/api/archives', archiveRootsSchema)),
    ]);
    this.recordings.set(recs.items);
    this.arrays.set(arrs.arrays);
    this.archiveRoots.set(roots.roots);
    if (recs.items.length && this.form.controls.recordingId.value === null) this.form.controls.recordingId.setValue(recs.items[0].id);
  }

  private async pickRecording(id: number | null): Promise<void> {
    this.recording.set(null);
    if (id === null) return;
    const detail = await firstValueFrom(this.api.get(`/api/recordings/${id}`, recordingDetailSchema));
    this.recording.set(detail);
    if (detail.arrayId !== null) this.form.controls.arrayId.setValue(detail.arrayId);
    // A suggested name only while the person has not typed one (the detail may arrive mid-typing).
    const name = this.form.controls.name;
    if (name.pristine && !name.value) name.setValue(`${detail.name.replace(/\.[^.]+$/, '')} bearing sweep`);
  }
}

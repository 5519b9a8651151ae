import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MEDIUM_PRESETS, aliasingLimitHz, type ArrayMedium, type ArrayRecord, type MediumPreset } from '../../../shared/api/arrays';
import { arrayGeometrySchema, type ArrayElement } from '../../../shared/arrays/array-geometry';
import { mackenzieSoundSpeed } from '../../../shared/physics/sound-speed';
import { PageHeaderComponent } from '../ui/page-header.component';
import { ArrayDrawingComponent } from './array-drawing.component';
import { buildLine, elementsToText, textToElements } from './element-table-text';

type MediumKind = 'preset' | 'sea-water-profile' | 'custom';

/** /arrays: the catalogue and an editor (line builder, x/y/z table with CSV paste, medium, aliasing check, drawing). */
@Component({
  selector: 'ns-arrays-page',
  imports: [ArrayDrawingComponent, FormsModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule, PageHeaderComponent],
  template: `
    <ns-page-header heading="Arrays" summary="Element positions, channel map, calibration and medium of your arrays.">
      <button mat-flat-button type="button" (click)="startNew()">New array</button>
    </ns-page-header>
    <div class="layout">
      <ul class="list" data-testid="array-list">
        @for (a of arrays(); track a.id) {
          <li><button mat-button type="button" (click)="edit(a)">{{ a.name }} · v{{ a.version }} · {{ a.geometry.elements.length }} el.</button>
            <small>{{ a.jobCount }} job(s), {{ a.recordingCount }} recording(s)</small></li>
        } @empty { <li class="muted">No arrays yet.</li> }
      </ul>
      <form class="editor" (ngSubmit)="save()">
        <mat-form-field appearance="outline"><mat-label>Name</mat-label><input matInput name="name" [(ngModel)]="name" required data-testid="array-name" /></mat-form-field>
        <mat-form-field appearance="outline"><mat-label>Notes</mat-label><textarea matInput name="notes" [(ngModel)]="notes" rows="2"></textarea></mat-form-field>
        <fieldset><legend>Line builder</legend>
          <mat-form-field><mat-label>Elements</mat-label><input matInput type="number" name="count" [(ngModel)]="count" min="1" /></mat-form-field>
          <mat-form-field><mat-label>Spacing (m)</mat-label><input matInput type="number" name="spacing" [(ngModel)]="spacing" step="0.01" /></mat-form-field>
          <mat-form-field><mat-label>Axis</mat-label><mat-select name="axis" [(ngModel)]="axis"><mat-option value="x">x</mat-option><mat-option value="y">y</mat-option><mat-option value="z">z</mat-option></mat-select></mat-form-field>
          <mat-form-field><mat-label>Origin x, y, z (m)</mat-label><input matInput name="origin" [(ngModel)]="origin" /></mat-form-field>
          <button mat-stroked-button type="button" (click)="build()">Fill the table</button>
        </fieldset>
        <mat-form-field appearance="outline" class="table">
          <mat-label>Elements: x, y, z, channel, gain, used/excluded (one per line; paste CSV here)</mat-label>
          <textarea matInput name="table" rows="8" [ngModel]="tableText()" (ngModelChange)="tableText.set($event)" data-testid="element-table"></textarea>
        </mat-form-field>
        <input type="file" accept=".csv,.txt" (change)="importCsv($event)" aria-label="Import element table (CSV)" />
        @if (parsed().error) { <p class="error">{{ parsed().error }}</p> }
        <fieldset><legend>Medium</legend>
          <mat-form-field><mat-label>Speed of sound from</mat-label>
            <mat-select name="mediumKind" [ngModel]="mediumKind()" (ngModelChange)="mediumKind.set($event)">
              <mat-option value="preset">a preset</mat-option><mat-option value="sea-water-profile">sea water (T, S, depth)</mat-option><mat-option value="custom">my value</mat-option>
            </mat-select></mat-form-field>
          @switch (mediumKind()) {
            @case ('preset') {
              <mat-form-field><mat-label>Preset</mat-label><mat-select name="preset" [ngModel]="preset()" (ngModelChange)="preset.set($event)">
                @for (p of presetKeys; track p) { <mat-option [value]="p">{{ presets[p].label }} ({{ presets[p].speedMps }} m/s)</mat-option> }
              </mat-select></mat-form-field>
            }
            @case ('sea-water-profile') {
              <mat-form-field><mat-label>Temperature (°C)</mat-label><input matInput type="number" name="t" [ngModel]="temp()" (ngModelChange)="temp.set(+$event)" /></mat-form-field>
              <mat-form-field><mat-label>Salinity (‰)</mat-label><input matInput type="number" name="s" [ngModel]="sal()" (ngModelChange)="sal.set(+$event)" /></mat-form-field>
              <mat-form-field><mat-label>Depth (m)</mat-label><input matInput type="number" name="d" [ngModel]="depth()" (ngModelChange)="depth.set(+$event)" /></mat-form-field>
            }
            @case ('custom') {
              <mat-form-field><mat-label>Speed (m/s)</mat-label><input matInput type="number" name="c" [ngModel]="customSpeed()" (ngModelChange)="customSpeed.set(+$event)" /></mat-form-field>
            }
          }
          <p data-testid="speed">c = {{ speed().text }}</p>
        </fieldset>
        <fieldset><legend>Frequencies</legend>
          <mat-form-field><mat-label>Design frequency (Hz)</mat-label><input matInput type="number" name="fd" [ngModel]="designHz()" (ngModelChange)="designHz.set($event === '' ? null : +$event)" /></mat-form-field>
          <mat-form-field><mat-label>Highest frequency you will process (Hz)</mat-label><input matInput type="number" name="fmax" [ngModel]="bandTopHz()" (ngModelChange)="bandTopHz.set(+$event)" /></mat-form-field>
          <p [class.error]="aliasing().warn" data-testid="aliasing">{{ aliasing().text }}</p>
        </fieldset>
        @if (parsed().elements.length) { <ns-array-drawing [elements]="parsed().elements" /> }
        @if (message()) { <p [class.error]="failed()" role="status">{{ message() }}</p> }
        <button mat-flat-button type="submit" data-testid="save-array">{{ editingId() ? 'Save' : 'Add to catalogue' }}</button>
      </form>
    </div>
  `,
  styles: `
    .layout { display: grid; grid-template-columns: minmax(200px, 280px) 1fr; gap: 24px; }
    .list { list-style: none; padding: 0; margin: 0; }
    .list small, .muted { display: block; color: var(--mat-sys-on-surface-variant); padding-left: 12px; }
    .editor { display: grid; gap: 8px; }
    fieldset { border: 1px solid var(--mat-sys-outline-variant); border-radius: 12px; display: flex; flex-wrap: wrap; gap: 8px; align-items: center; }
    .table textarea { font-family: 'Roboto Mono', monospace; }
    .error { color: var(--mat-sys-error); }
    @media (max-width: 800px) { .layout { grid-template-columns: 1fr; } }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ArraysPageComponent {
  private readonly http = inject(HttpClient);
  protected readonly presets = MEDIUM_PRESETS;
  protected readonly presetKeys = Object.keys(MEDIUM_PRESETS) as MediumPreset[];
  protected readonly arrays = signal<ArrayRecord[]>([]);
  protected readonly editingId = signal<number | null>(null);
  protected name = '';
  protected notes = '';
  protected count = 8;
  protected spacing = 0.5;
  protected axis: 'x' | 'y' | 'z' = 'x';
  protected origin = '0, 0, 0';
  protected readonly tableText = signal(elementsToText(buildLine(8, 0.5, 'x', [0, 0, 0])));
  protected readonly mediumKind = signal<MediumKind>('preset');
  protected readonly preset = signal<MediumPreset>('sea-water');
  protected readonly temp = signal(10);
  protected readonly sal = signal(35);
  protected readonly depth = signal(50);
  protected readonly customSpeed = signal(1500);
  protected readonly designHz = signal<number | null>(null);
  protected readonly bandTopHz = signal(1000);
  protected readonly message = signal('');
  protected readonly failed = signal(false);

  protected readonly parsed = computed(() => textToElements(this.tableText()));
  protected readonly speed = computed((): { value: number; text: string } => {
    try {
      switch (this.mediumKind()) {
        case 'preset': return { value: MEDIUM_PRESETS[this.preset()].speedMps, text: `${MEDIUM_PRESETS[this.preset()].speedMps} m/s` };
        case 'sea-water-profile': {
          const c = mackenzieSoundSpeed(this.temp(), this.sal(), this.depth());
          return { value: c, text: `${c.toFixed(3)} m/s (Mackenzie 1981)` };
        }
        default: return { value: this.customSpeed(), text: `${this.customSpeed()} m/s` };
      }
    } catch (e) {
      return { value: NaN, text: e instanceof Error ? e.message : String(e) };
    }
  });
  protected readonly aliasing = computed(() => {
    const limit = aliasingLimitHz({ elements: this.parsed().elements, speedOfSoundMps: this.speed().value });
    if (!Number.isFinite(limit)) return { warn: false, text: 'One active element: no spatial aliasing to check.' };
    const warn = this.bandTopHz() > limit || (this.designHz() ?? 0) > limit;
    return {
      warn,
      text: warn
        ? `Spatial aliasing: with the closest elements ${this.speed().value.toFixed(1)} m/s ÷ (2 × spacing) = ${limit.toFixed(1)} Hz is the highest frequency free of grating lobes; bins above it will show false bearings.`
        : `Free of spatial aliasing up to ${limit.toFixed(1)} Hz (d ≤ λ/2).`,
    };
  });

  constructor() {
    this.reload();
  }

  protected startNew(): void {
    this.editingId.set(null);
    this.name = '';
    this.notes = '';
    this.tableText.set(elementsToText(buildLine(8, 0.5, 'x', [0, 0, 0])));
    this.message.set('');
  }

  protected edit(a: ArrayRecord): void {
    this.editingId.set(a.id);
    this.name = a.name;
    this.notes = a.notes;
    this.tableText.set(elementsToText(a.geometry.elements));
    this.mediumKind.set(a.medium.kind);
    if (a.medium.kind === 'preset') this.preset.set(a.medium.preset);
    if (a.medium.kind === 'sea-water-profile') {
      this.temp.set(a.medium.temperatureC);
      this.sal.set(a.medium.salinityPsu);
      this.depth.set(a.medium.depthM);
    }
    this.customSpeed.set(a.geometry.speedOfSoundMps);
    this.designHz.set(a.designFrequencyHz);
    this.message.set(a.jobCount ? `Jobs used version ${a.version}: saving creates version ${a.version + 1}; old results keep their geometry.` : '');
    this.failed.set(false);
  }

  protected build(): void {
    const o = this.origin.split(/[,;\s]+/).filter(Boolean).map(Number);
    if (o.length !== 3 || !o.every(Number.isFinite) || !(this.count >= 1) || !Number.isFinite(this.spacing)) {
      this.fail('The builder needs a whole element count, a spacing in metres and an origin "x, y, z".');
      return;
    }
    this.tableText.set(elementsToText(buildLine(Math.round(this.count), this.spacing, this.axis, o as [number, number, number])));
  }

  protected importCsv(e: Event): void {
    const file = (e.target as HTMLInputElement).files?.[0];
    if (file) void file.text().then((t) => this.tableText.set(t));
  }

  protected save(): void {
    const { elements, error } = this.parsed();
    if (error) return this.fail(error);
    const medium: ArrayMedium =
      this.mediumKind() === 'preset' ? { kind: 'preset', preset: this.preset() }
      : this.mediumKind() === 'sea-water-profile' ? { kind: 'sea-water-profile', temperatureC: this.temp(), salinityPsu: this.sal(), depthM: this.depth() }
      : { kind: 'custom' };
    const geometry = { name: this.name, notes: this.notes, speedOfSoundMps: this.speed().value, elements: elements as ArrayElement[] };
    const check = arrayGeometrySchema.safeParse(geometry);
    if (!check.success) return this.fail(check.error.issues[0].message);
    const body = { geometry, medium, designFrequencyHz: this.designHz() };
    const id = this.editingId();
    const call = id ? this.http.put<ArrayRecord>(`/api/arrays/${id}`, body) : this.http.post<ArrayRecord>('/api/arrays', body);
    call.subscribe({
      next: (a) => {
        this.failed.set(false);
        this.message.set(id && a.id !== id ? `Saved as version ${a.version} (jobs keep version ${a.version - 1}).` : 'Saved.');
        this.editingId.set(a.id);
        this.reload();
      },
      error: (e: { error?: { error?: { message?: string } } }) => this.fail(e.error?.error?.message ?? 'Saving failed; try again.'),
    });
  }

  private fail(text: string): void {
    this.failed.set(true);
    this.message.set(text);
  }

  private reload(): void {
    this.http.get<{ arrays: ArrayRecord[] }>('/api/arrays').subscribe((r) => this.arrays.set(r.arrays));
  }
}

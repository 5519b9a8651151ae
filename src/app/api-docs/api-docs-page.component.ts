import { JsonPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import * as z from 'zod';
import { PANEL_STYLES } from '../admin/panel.styles';
import { ApiService } from '../core/api.service';
import { PageHeaderComponent } from '../ui/page-header.component';

const operationSchema = z
  .object({
    summary: z.string(),
    description: z.string().optional(),
    tags: z.array(z.string()),
    parameters: z.array(z.object({ name: z.string(), in: z.string(), required: z.boolean().optional(), schema: z.unknown() }).loose()).optional(),
    requestBody: z.object({ content: z.record(z.string(), z.object({ schema: z.unknown() }).loose()) }).loose().optional(),
    responses: z.record(z.string(), z.unknown()),
  })
  .loose();
const documentSchema = z.object({
  info: z.object({ title: z.string(), version: z.string(), description: z.string() }).loose(),
  paths: z.record(z.string(), z.record(z.string(), operationSchema)),
}).loose();

interface Entry {
  method: string;
  path: string;
  op: z.infer<typeof operationSchema>;
}

/** /api-docs: the OpenAPI document of /api/openapi.json, grouped by area and readable. */
@Component({
  selector: 'ns-api-docs-page',
  imports: [JsonPipe, MatExpansionModule, MatProgressBarModule, PageHeaderComponent],
  template: `
    <ns-page-header heading="API" summary="Every endpoint, generated from the server's own schemas.">
      <a class="raw" href="/api/openapi.json">openapi.json</a>
    </ns-page-header>
    @if (doc.isLoading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Loading the API description" />
    }
    @if (doc.hasValue()) {
      <p class="intro">{{ doc.value().info.description }}</p>
      @for (g of groups(); track g.tag) {
        <section class="panel" [attr.aria-label]="g.tag">
          <header class="panel-head"><h2>{{ g.tag }}</h2></header>
          <mat-accordion class="panel-body">
            @for (e of g.entries; track e.method + e.path) {
              <mat-expansion-panel>
                <mat-expansion-panel-header>
                  <mat-panel-title><span class="method" [attr.data-method]="e.method">{{ e.method }}</span><span class="mono">{{ e.path }}</span></mat-panel-title>
                  <mat-panel-description>{{ e.op.summary }}</mat-panel-description>
                </mat-expansion-panel-header>
                <p>{{ e.op.description }}</p>
                @if (e.op.parameters?.length) {
                  <h3>Parameters</h3>
                  <ul>
                    @for (p of e.op.parameters; track p.name) {
                      <li><span class="mono">{{ p.name }}</span> ({{ p.in }}{{ p.required ? ', required' : '' }}) <span class="mono hint">{{ p.schema | json }}</span></li>
                    }
                  </ul>
                }
                @if (e.op.requestBody) {
                  <h3>Body</h3>
                  @for (c of contentTypes(e.op.requestBody.content); track c.type) {
                    <p class="hint">{{ c.type }}</p>
                    <pre class="mono">{{ c.schema | json }}</pre>
                  }
                }
                <h3>Answers</h3>
                <p class="mono">{{ statuses(e.op.responses) }}</p>
              </mat-expansion-panel>
            }
          </mat-accordion>
        </section>
      }
    }
  `,
  styles: `
    ${PANEL_STYLES}
    .intro { white-space: pre-line; max-width: 80ch; }
    .method {
      display: inline-block;
      min-width: 64px;
      margin-right: 12px;
      font: 600 12px 'Roboto Mono', monospace;
      color: var(--mat-sys-primary);
    }
    .method[data-method='DELETE'] { color: var(--mat-sys-error); }
    .method[data-method='GET'] { color: var(--mat-sys-tertiary); }
    pre { white-space: pre-wrap; max-height: 360px; overflow: auto; background: var(--mat-sys-surface-container); padding: 8px; border-radius: 8px; }
    h3 { font: var(--mat-sys-title-small); margin: 12px 0 4px; }
    .raw { font-family: 'Roboto Mono', monospace; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ApiDocsPageComponent {
  private readonly api = inject(ApiService);
  protected readonly doc = rxResource({ stream: () => this.api.get('/api/openapi.json', documentSchema) });
  protected readonly groups = computed(() => {
    if (!this.doc.hasValue()) return [];
    const by = new Map<string, Entry[]>();
    for (const [path, ops] of Object.entries(this.doc.value().paths)) {
      for (const [method, op] of Object.entries(ops)) {
        const tag = op.tags[0] ?? 'Other';
        if (!by.has(tag)) by.set(tag, []);
        by.get(tag)!.push({ method: method.toUpperCase(), path, op });
      }
    }
    return [...by].map(([tag, entries]) => ({ tag, entries }));
  });

  protected contentTypes(content: Record<string, { schema?: unknown }>): { type: string; schema: unknown }[] {
    return Object.entries(content).map(([type, c]) => ({ type, schema: c.schema }));
  }

  protected statuses(responses: Record<string, unknown>): string {
    return Object.keys(responses)
      .map((s) => (s === 'default' ? 'error: { error: { code, message } }' : s))
      .join(' · ');
  }
}

/**
 * Plot data and downloads of a real finished job (the demo job, queued by the demo-data code
 * and run through the queue and a compute child): the plot endpoints return exactly what the
 * CSV files hold, gzip downloads unpack to the plain bytes, bad queries get clear 400s, and a
 * large CSV streams without the server holding it in memory.
 */
import zlib from 'node:zlib';
import { expect } from 'chai';
import type { JobDto } from '../../shared/api/jobs.js';
import type { BeamWeights, EigenSpectrum, RunInfo, WindowsPage } from '../../shared/api/results.js';
import { queueDemoJob } from '../../server/demo/demo-job.js';
import { startTestServer, type TestClient, type TestServer } from './helpers/test-server.js';

async function until<T>(what: string, fn: () => Promise<T | undefined>, timeoutMs = 240_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** CSV body rows (comment lines and header dropped), split into fields. */
const rows = (csv: string) =>
  csv
    .split('\n')
    .filter((l) => l && !l.startsWith('#'))
    .slice(1)
    .map((l) => l.split(','));
const dbField = (s: string) => (s === '' ? null : Number(s));

describe('plot data and result downloads', function () {
  this.timeout(400_000);
  let server: TestServer;
  let analyst: TestClient;
  let job: JobDto;
  let run: RunInfo;

  before(async () => {
    server = await startTestServer();
    const id = await queueDemoJob(server.ctx);
    expect(id, 'demo job queued on a fresh database').to.be.a('number');
    expect(await queueDemoJob(server.ctx), 'queued only once').to.equal(null);
    analyst = await server.signIn('analyst');
    job = await until('demo job to finish', async () => {
      const { job: j } = await analyst.getJson<{ job: JobDto }>(`/api/jobs/${id}`);
      if (j.state === 'failed') throw new Error(`demo job failed: ${j.lastError}`);
      return j.state === 'succeeded' ? j : undefined;
    });
    run = await analyst.getJson<RunInfo>(`/api/plots/${job.id}/run`);
  });
  after(async () => server?.close());

  it('describes the run: parameters, setup, checksum, software version, caution', () => {
    expect(run.windowsStored).to.equal(job.totalWindows);
    expect(run.setup.azimuthsDeg).to.have.length(181);
    expect(run.meta['recordingSha256']).to.match(/^[0-9a-f]{64}$/);
    expect(String(run.meta['softwareVersion'])).to.match(/^Nullsmith \d/);
    expect(run.caution).to.match(/qualified person/);
  });

  it('serves per-window broadband values exactly as sinr.csv holds them', async () => {
    const page = await analyst.getJson<WindowsPage>(`/api/plots/${job.id}/windows`);
    expect(page.windows).to.have.length(job.totalWindows!);
    const csv = await (await analyst.get(`/api/results/${job.id}/sinr.csv?comments=off`)).text();
    // Broadband rows leave freq_hz (column 5) empty: window, t0, t1, az, el, '', sinr, capon, conv, '', ''.
    const broadband = rows(csv).filter((r) => r[5] === '');
    expect(broadband).to.have.length(page.windows.length * run.setup.azimuthsDeg.length);
    for (const r of broadband) {
      const w = page.windows[Number(r[0])];
      const beam = run.setup.azimuthsDeg.indexOf(Number(r[3]));
      expect(w.tStartS).to.be.closeTo(Number(r[1]), 1e-9);
      expect(w.sinrDb[beam]).to.equal(dbField(r[6]));
      expect(w.adaptiveDb[beam]).to.equal(dbField(r[7]));
      expect(w.conventionalDb[beam]).to.equal(dbField(r[8]));
    }
  });

  it('serves a saved beam’s weights exactly as weights.csv holds them', async () => {
    const beam = run.setup.savedBeams[1];
    const window = 3;
    const bin = 5;
    const w = await analyst.getJson<BeamWeights>(`/api/plots/${job.id}/weights?window=${window}&bin=${bin}&beam=${beam}`);
    const csv = await (await analyst.get(`/api/results/${job.id}/weights.csv?comments=off&fromWindow=${window}&toWindow=${window}&bins=${bin}&beams=${beam}`)).text();
    const lines = rows(csv);
    expect(lines).to.have.length(run.setup.channels);
    lines.forEach((r, n) => {
      expect(Number(r[6])).to.equal(n);
      expect(w.weights[n]).to.deep.equal([Number(r[7]), Number(r[8])]);
    });
    // Distortionless: w^H v = 1 at the look direction (Capon 1969; CONVENTIONS.md), to float32 precision.
    const u = [Math.sin((w.azimuthDeg * Math.PI) / 180), Math.cos((w.azimuthDeg * Math.PI) / 180), 0];
    let re = 0;
    let im = 0;
    w.positionsM.forEach((p, n) => {
      const phase = (2 * Math.PI * w.freqHz * (p[0] * u[0] + p[1] * u[1] + p[2] * u[2])) / w.speedMps;
      const [a, b] = w.weights[n];
      // conj(w)·v = (a − jb)(cos φ + j sin φ)
      re += a * Math.cos(phase) + b * Math.sin(phase);
      im += a * Math.sin(phase) - b * Math.cos(phase);
    });
    expect(re).to.be.closeTo(1, 1e-4);
    expect(im).to.be.closeTo(0, 1e-4);
  });

  it('serves an eigen spectrum with its Marchenko–Pastur band', async () => {
    const e = await analyst.getJson<EigenSpectrum>(`/api/plots/${job.id}/eigen?window=2&bin=10`);
    expect(e.eigenvalues).to.have.length(run.setup.channels);
    for (let i = 1; i < e.eigenvalues.length; i++) expect(e.eigenvalues[i]).to.be.at.most(e.eigenvalues[i - 1]);
    // Marchenko & Pastur (1967), DOMAIN.md §3.5: band σ²(1 ± √(N/K))².
    const c = e.n / e.k;
    expect(e.mpUpper).to.be.closeTo(e.noiseFloor * (1 + Math.sqrt(c)) ** 2, e.mpUpper * 1e-5);
    expect(e.mpLower).to.be.closeTo(e.noiseFloor * (1 - Math.sqrt(c)) ** 2, e.mpUpper * 1e-5);
  });

  it('answers bad plot queries and filters with a clear 400', async () => {
    const cases: [string, RegExp][] = [
      [`/api/plots/${job.id}/eigen?window=9999&bin=0`, /not stored yet/],
      [`/api/plots/${job.id}/eigen?window=0&bin=999`, /Bin 999 does not exist/],
      [`/api/plots/${job.id}/weights?window=0&bin=0&beam=0`, /no saved weights; saved beams are/],
      [`/api/plots/${job.id}/windows?fromWindow=x`, /fromWindow must be a whole number/],
      [`/api/results/${job.id}/weights.csv?beams=1,a`, /beams must be comma-separated/],
      [`/api/results/${job.id}/sinr.csv?bins=500`, /Bin 500 does not exist/],
      [`/api/results/${job.id}/sinr.csv?gzip=yes`, /gzip must be "on" or "off"/],
    ];
    for (const [url, message] of cases) {
      const res = await analyst.get(url);
      expect(res.status, url).to.equal(400);
      expect(((await res.json()) as { error: { message: string } }).error.message, url).to.match(message);
    }
    expect((await server.client().get(`/api/plots/${job.id}/run`)).status).to.equal(401);
  });

  it('gzip downloads unpack to the plain CSV, with a proper file name', async () => {
    const plain = await analyst.get(`/api/results/${job.id}/weights.csv?fromWindow=0&toWindow=4`);
    expect(plain.headers.get('content-disposition')).to.equal(`attachment; filename="nullsmith-job-${job.id}-gannet-ledge-transit-mpdr-bearing-sweep-weights-w0-4.csv"`);
    const text = await plain.text();
    const gz = await analyst.get(`/api/results/${job.id}/weights.csv?fromWindow=0&toWindow=4&gzip=on`);
    expect(gz.headers.get('content-type')).to.equal('application/gzip');
    expect(gz.headers.get('content-disposition')).to.match(/weights-w0-4\.csv\.gz"$/);
    expect(zlib.gunzipSync(Buffer.from(await gz.arrayBuffer())).toString()).to.equal(text);
  });

  it('streams a large CSV with bounded memory', async () => {
    global.gc?.();
    const base = process.memoryUsage().heapUsed;
    let peak = base;
    let bytes = 0;
    const res = await analyst.get(`/api/results/${job.id}/sinr.csv`);
    const reader = res.body!.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      bytes += value.byteLength;
      peak = Math.max(peak, process.memoryUsage().heapUsed);
      // a slow reader: the server must wait (back-pressure), not buffer
      if (bytes % 10 === 0) await new Promise((r) => setImmediate(r));
    }
    const growthMb = (peak - base) / 2 ** 20;
    console.log(`      sinr.csv ${(bytes / 2 ** 20).toFixed(1)} MB streamed; heap growth ${growthMb.toFixed(1)} MB`);
    expect(bytes).to.be.greaterThan(15 * 2 ** 20);
    expect(growthMb).to.be.lessThan(bytes / 2 ** 20 / 2);
  });
});

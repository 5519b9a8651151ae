import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { healthResponseSchema } from '../../shared/api/health.js';
import { startServerProcess } from './helpers/server-process.js';

describe('server process and GET /api/health', function () {
  this.timeout(180_000); // a first start creates the database; slow on a busy 2-core machine
  let dataDir: string;
  before(() => {
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-health-'));
  });
  after(() => fs.rmSync(dataDir, { recursive: true, force: true }));

  it('prints one listening line with the real port (PORT=0), answers health, and exits 0 on SIGTERM', async () => {
    const proc = await startServerProcess({ PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, LOG_LEVEL: 'warn', NODE_ENV: 'production' });
    try {
      expect(proc.url).to.match(/^http:\/\/127\.0\.0\.1:\d+$/);
      expect(proc.url).not.to.match(/:0$/);
      const res = await fetch(`${proc.url}/api/health`);
      expect(res.status).to.equal(200);
      const body = healthResponseSchema.parse(await res.json());
      const pkg = JSON.parse(fs.readFileSync('package.json', 'utf8')) as { version: string };
      expect(body).to.include({ status: 'ok', database: 'pglite', version: pkg.version });
      expect(body.uptimeS).to.be.at.least(0);
    } finally {
      const code = await proc.stop('SIGTERM');
      expect(code).to.equal(0);
    }
    expect(proc.stdout().trim().split('\n')).to.deep.equal([`Nullsmith listening on ${proc.url}`]);
    // production logs are JSON lines on stderr
    for (const line of proc.stderr().trim().split('\n').filter(Boolean)) expect(() => JSON.parse(line)).not.to.throw();
  });
});

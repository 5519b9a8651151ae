/**
 * SIGKILL of the server process while it writes to its embedded database (PGlite on disk in
 * DATA_DIR/db): four clients keep creating array records over HTTP; the server is killed at
 * a random moment in the middle of that, three times over. After each kill the server must
 * start again on the same DATA_DIR (stale pid file, migrations, sessions) and every write it
 * acknowledged (201) before the kill must be there, unchanged. Writes in flight at the kill
 * may or may not have landed; none may be half there.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { ArrayRecord } from '../../shared/api/arrays.js';
import { lineArray } from '../../shared/arrays/array-geometry.js';
import { startServerProcess, type ServerProcess } from '../server/helpers/server-process.js';
import { signInDemo, TestClient } from '../server/helpers/test-server.js';

const ROUNDS = Number(process.env.FAULT_DB_ROUNDS ?? 3);

const signIn = (url: string): Promise<TestClient> => signInDemo(url, 'analyst');

describe(`faults: SIGKILL of the server during database writes (${ROUNDS} rounds)`, function () {
  this.timeout(900_000);
  let dataDir: string;
  let server: ServerProcess | undefined;
  const env = () => ({ NODE_ENV: 'test', PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, DEMO_DATA: 'on', LOG_LEVEL: 'warn', WORKER_CONCURRENCY: '1' });

  before(() => {
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'nullsmith-dbkill-'));
  });
  after(async () => {
    if (server && server.child.exitCode === null) await server.stop('SIGKILL');
    fs.rmSync(dataDir, { recursive: true, force: true });
  });

  it('reopens cleanly every time and keeps every acknowledged write', async () => {
    const acknowledged = new Map<number, string>();
    let inFlightAtKills = 0;
    for (let round = 0; round < ROUNDS; round++) {
      server = await startServerProcess(env());
      const client = await signIn(server.url);
      // everything acknowledged in earlier rounds is there, exactly as written
      const { arrays } = await client.getJson<{ arrays: ArrayRecord[] }>('/api/arrays');
      const byId = new Map(arrays.map((a) => [a.id, a.name]));
      for (const [id, name] of acknowledged) expect(byId.get(id), `array ${id} "${name}" was acknowledged before a kill`).to.equal(name);

      let stop = false;
      let inFlight = 0;
      const writer = async (w: number) => {
        for (let i = 0; !stop && i < 10_000; i++) {
          const name = `kill-r${round}-w${w}-${i}`;
          inFlight++;
          try {
            const res = await client.post('/api/arrays', { geometry: lineArray({ name, count: 4 + (i % 8), spacingM: 0.5, speedOfSoundMps: 1500 }), medium: { kind: 'preset', preset: 'sea-water' } });
            if (res.status === 201) acknowledged.set(((await res.json()) as ArrayRecord).id, name);
          } catch {
            // the connection died with the server: not acknowledged
          } finally {
            inFlight--;
          }
        }
      };
      const writers = [0, 1, 2, 3].map(writer);
      // kill at a random moment once writes are flowing
      const before = acknowledged.size;
      while (acknowledged.size < before + 20) await new Promise((r) => setTimeout(r, 10));
      await new Promise((r) => setTimeout(r, 300 + Math.random() * 2500));
      inFlightAtKills += inFlight;
      await server.stop('SIGKILL');
      stop = true;
      await Promise.all(writers);
    }
    // a last, clean start: all acknowledged writes are there
    server = await startServerProcess(env());
    const client = await signIn(server.url);
    const { arrays } = await client.getJson<{ arrays: ArrayRecord[] }>('/api/arrays');
    const byId = new Map(arrays.map((a) => [a.id, a]));
    for (const [id, name] of acknowledged) {
      const a = byId.get(id);
      expect(a?.name, `array ${id} "${name}" was acknowledged before a kill`).to.equal(name);
      expect(a!.geometry.elements.length, 'a whole record, not part of one').to.be.within(4, 11);
    }
    const unacked = arrays.filter((a) => a.name.startsWith('kill-') && !acknowledged.has(a.id)).length;
    console.log(`      ${acknowledged.size} acknowledged writes over ${ROUNDS} kills, all present; ${inFlightAtKills} requests were in flight at the kills, ${unacked} of them landed`);
    expect(await server.stop('SIGTERM')).to.equal(0);
    server = undefined;
  });
});

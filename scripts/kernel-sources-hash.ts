/** SHA-256 over the AssemblyScript kernel sources (names and bytes, in name order). */
import { createHash } from 'node:crypto';
import fs from 'node:fs';

export function kernelSourcesHash(dir: URL): string {
  const hash = createHash('sha256');
  for (const name of fs.readdirSync(dir).filter((f) => f.endsWith('.ts')).sort()) {
    hash.update(name).update('\0').update(fs.readFileSync(new URL(name, dir))).update('\0');
  }
  return hash.digest('hex');
}

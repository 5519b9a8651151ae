import fs from 'node:fs/promises';
import path from 'node:path';

/** Bytes a folder takes (files' allocated blocks when known, else sizes), without following links. */
export async function folderBytes(dir: string): Promise<number> {
  let total = 0;
  let entries;
  try {
    entries = await fs.readdir(dir, { withFileTypes: true });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 0;
    throw err;
  }
  for (const e of entries) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) total += await folderBytes(p);
    else {
      const st = await fs.lstat(p);
      total += st.blocks !== undefined && st.blocks > 0 ? st.blocks * 512 : st.size;
    }
  }
  return total;
}

/** Deletes a job's result folder; returns the bytes it held (0 when it was already gone). */
export async function deleteResultFolder(dir: string): Promise<number> {
  const bytes = await folderBytes(dir);
  await fs.rm(dir, { recursive: true, force: true });
  return bytes;
}

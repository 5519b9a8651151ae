import fs from 'node:fs/promises';
import path from 'node:path';
import { badRequest, forbidden } from '../http/http-error.js';

/** True when `candidate` (a realpath) is `root` itself or lies inside it (also a realpath). */
export function isInside(root: string, candidate: string): boolean {
  const rel = path.relative(root, candidate);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
}

/**
 * Resolves `relative` under an archive root and refuses anything that ends up outside it:
 * `..` segments, absolute paths, and symlinks whose target escapes the root (both sides
 * compared as realpaths, so a root that is itself reached through a symlink still works).
 */
export async function resolveInsideRoot(rootPath: string, relative: string): Promise<{ real: string; rootReal: string }> {
  let rootReal: string;
  try {
    rootReal = await fs.realpath(rootPath);
  } catch {
    throw badRequest(`The archive folder ${rootPath} is not reachable on the server any more. Ask an administrator to check or remove this archive root.`);
  }
  if (relative.includes('\0')) throw badRequest('The path contains a NUL character; pick the file from the folder listing.');
  const joined = path.resolve(rootReal, relative.replace(/^[/\\]+/, ''));
  if (!isInside(rootReal, joined)) {
    throw forbidden(`${relative} lies outside the archive folder; only files under the archive root can be registered.`);
  }
  let real: string;
  try {
    real = await fs.realpath(joined);
  } catch {
    throw badRequest(`${relative} does not exist under the archive folder (or a link in its path is broken). Browse the folder and pick an existing file.`);
  }
  if (!isInside(rootReal, real)) {
    throw forbidden(`${relative} is a symbolic link to ${real}, outside the archive folder; links that leave the archive root are refused.`);
  }
  return { real, rootReal };
}

/** Turns a file-name pattern with * and ? into a RegExp (no folders, no other syntax). */
export function patternToRegExp(pattern: string): RegExp {
  if (!pattern || pattern.length > 200 || /[/\\]/.test(pattern)) {
    throw badRequest(`The pattern "${pattern}" is not usable: give a file-name pattern such as *.wav or hydro_??.wav (no folders, at most 200 characters).`);
  }
  const body = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '.*').replace(/\?/g, '.');
  return new RegExp(`^${body}$`, 'i');
}

import crypto from 'node:crypto';
import { promisify } from 'node:util';

const scrypt = promisify(crypto.scrypt) as (pw: crypto.BinaryLike, salt: crypto.BinaryLike, keylen: number, opts: crypto.ScryptOptions) => Promise<Buffer>;

/**
 * scrypt from node:crypto: memory-hard (each guess costs 128·N·r bytes, 32 MiB here), so
 * stolen hashes are slow to attack even on GPUs, and it needs no native add-on. N = 2^15,
 * r = 8, p = 1 is the OWASP Password Storage Cheat Sheet's minimum for scrypt (2023, from
 * memory); about 60-100 ms per hash on this machine's CPUs. Parameters are stored with each
 * hash so they can be raised later without breaking old accounts.
 */
const N = 2 ** 15;
const R = 8;
const P = 1;
const KEY_LEN = 32;
const maxmem = (n: number, r: number) => 256 * n * r; // twice the need: node refuses exact fits

export async function hashPassword(password: string): Promise<string> {
  const salt = crypto.randomBytes(16);
  const hash = await scrypt(password.normalize('NFKC'), salt, KEY_LEN, { N, r: R, p: P, maxmem: maxmem(N, R) });
  return ['scrypt', N, R, P, salt.toString('base64'), hash.toString('base64')].join('$');
}

/** Constant-time comparison (timingSafeEqual), so response time does not leak how many bytes matched. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [n, r, p] = parts.slice(1, 4).map(Number);
  const salt = Buffer.from(parts[4], 'base64');
  const expected = Buffer.from(parts[5], 'base64');
  if (!n || !r || !p || expected.length === 0) return false;
  const actual = await scrypt(password.normalize('NFKC'), salt, expected.length, { N: n, r, p, maxmem: maxmem(n, r) });
  return crypto.timingSafeEqual(actual, expected);
}

let dummyHash: Promise<string> | undefined;
/**
 * Spends the same time as a real check when the e-mail is unknown, so response timing does
 * not tell an attacker which addresses have accounts.
 */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword(crypto.randomBytes(16).toString('hex'));
  await verifyPassword(password, await dummyHash);
  return false;
}

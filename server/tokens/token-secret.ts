import crypto from 'node:crypto';

/**
 * Token secrets look like `nsk_<43 base64url chars>` (256 random bits). The fixed start lets
 * secret scanners and people recognise a Nullsmith key; the same helper makes one-time links.
 */
export const TOKEN_PREFIX = 'nsk_';

export function newSecret(prefix = TOKEN_PREFIX): string {
  return prefix + crypto.randomBytes(32).toString('base64url');
}

/** SHA-256 hex: enough for 256-bit random secrets (nothing to guess), and fast per request. */
export function secretDigest(secret: string): string {
  return crypto.createHash('sha256').update(secret, 'utf8').digest('hex');
}

/** The first characters shown in lists so people can tell tokens apart. */
export const displayPrefix = (secret: string): string => secret.slice(0, TOKEN_PREFIX.length + 6);

import fs from 'node:fs';
import path from 'node:path';
import express, { Router } from 'express';
import { REPO_ROOT } from '../version.js';

export const CLIENT_DIR = path.join(REPO_ROOT, 'dist', 'nullsmith', 'browser');

/** Angular's hashed bundle names (main-ABCD1234.js) never change content: cache them for a year. */
const HASHED = /-[A-Z0-9]{8,}\.(js|css|woff2?|ttf)$/;

/**
 * The built Angular client, with the SPA fallback: any other GET outside /api gets index.html
 * so deep links work. When the client has not been built yet, says how to build it.
 */
export function clientFiles(dir = CLIENT_DIR): Router {
  const router = Router();
  router.use(
    express.static(dir, {
      index: false,
      setHeaders: (res, file) => res.setHeader('Cache-Control', HASHED.test(file) ? 'public, max-age=31536000, immutable' : 'no-cache'),
    }),
  );
  router.get('/{*splat}', (_req, res) => {
    const index = path.join(dir, 'index.html');
    if (!fs.existsSync(index)) {
      res
        .status(503)
        .type('text/plain')
        .send('The Nullsmith web client has not been built yet. Run "npm run build:client" (npm start does it for you), then reload this page.\n');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
  return router;
}

import type { NestExpressApplication } from '@nestjs/platform-express';
import type { NextFunction, Request, Response } from 'express';
import { existsSync } from 'node:fs';
import { join } from 'node:path';

const NOT_BUILT_PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Kinpath</title></head>
<body><main><h1>Kinpath</h1>
<p>The web client is not built yet. Build it with <code>npm run build -w @kinpath/frontend</code>, or use the API under <a href="/api/docs">/api/docs</a>.</p>
</main></body></html>`;

function isApi(path: string): boolean {
  return path === '/api' || path.startsWith('/api/');
}

/**
 * Serves the built web client from `staticDir` and answers other GET paths with
 * its index.html, so deep links reach the client's router. `/api` stays the API's.
 */
export function serveSpa(app: NestExpressApplication, staticDir: string): void {
  const index = join(staticDir, 'index.html');
  // Hashed asset names never change content, so they may be cached for long.
  app.useStaticAssets(staticDir, {
    index: false,
    fallthrough: true,
    setHeaders: (res, path) => {
      if (path.includes(`${join(staticDir, 'assets')}`)) {
        res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
      }
    },
  });
  app.use((req: Request, res: Response, next: NextFunction) => {
    if ((req.method !== 'GET' && req.method !== 'HEAD') || isApi(req.path)) return next();
    // A missing file (an old asset name) is a 404, not the client page.
    if (/\.[a-z0-9]+$/i.test(req.path)) return next();
    res.setHeader('Cache-Control', 'no-cache');
    if (existsSync(index)) return res.sendFile(index);
    res.status(200).type('html').send(NOT_BUILT_PAGE);
  });
}

/**
 * Building the site, and a small static file server for it, with the cross-origin
 * isolation headers the WASM backend wants. Only serves files under `root`;
 * no directory listings; unknown paths are 404.
 */
import { execFile } from 'node:child_process';
import { createServer, type Server } from 'node:http';
import { readFile, stat } from 'node:fs/promises';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));

/**
 * Build the static site (vite build) into `outDir`; rejects with vite's own
 * message. Vite allows one build per project at a time (a lock file): while
 * another build holds it (browser tests build in parallel), wait and retry
 * within the same time budget.
 */
export async function buildSite(outDir: string, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const left = deadline - Date.now();
    const failure = await new Promise<Error | null>((ok) => {
      execFile(
        process.execPath,
        [join(ROOT, 'node_modules/vite/bin/vite.js'), 'build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'error'],
        { cwd: ROOT, timeout: Math.max(1, left), maxBuffer: 64 * 1024 * 1024 },
        (error, _stdout, stderr) => ok(error ? new Error(`vite build failed: ${error.message}\n${stderr}`) : null),
      );
    });
    if (!failure) return;
    if (!/Found another Vite build process/.test(failure.message) || Date.now() + 2_000 > deadline) throw failure;
    await new Promise((wait) => setTimeout(wait, 2_000));
  }
}

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.wasm': 'application/wasm',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.txt': 'text/plain; charset=utf-8',
};

export interface StaticServer {
  url: string;
  server: Server;
  close(): Promise<void>;
}

export async function serveStatic(rootDir: string, port = 0): Promise<StaticServer> {
  const root = resolve(rootDir);
  const server = createServer((req, res) => {
    void (async () => {
      const headers: Record<string, string> = {
        'Cross-Origin-Opener-Policy': 'same-origin',
        'Cross-Origin-Embedder-Policy': 'require-corp',
        'Cache-Control': 'no-store',
      };
      try {
        const pathname = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname);
        let file = normalize(join(root, pathname));
        if (file !== root && !file.startsWith(root + sep)) {
          res.writeHead(403, headers).end('forbidden');
          return;
        }
        const info = await stat(file).catch(() => null);
        if (info?.isDirectory()) file = join(file, 'index.html');
        const body = await readFile(file);
        res.writeHead(200, { ...headers, 'Content-Type': TYPES[extname(file)] ?? 'application/octet-stream' }).end(body);
      } catch {
        res.writeHead(404, headers).end('not found');
      }
    })();
  });
  await new Promise<void>((ok) => server.listen(port, '127.0.0.1', ok));
  const address = server.address();
  const actual = typeof address === 'object' && address ? address.port : port;
  return {
    url: `http://127.0.0.1:${actual}/`,
    server,
    close: () =>
      new Promise<void>((ok) => {
        server.closeAllConnections();
        server.close(() => ok());
      }),
  };
}

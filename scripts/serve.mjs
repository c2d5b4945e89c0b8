// Tailmark's own tiny static server for dist-web/ (no dependencies).
//   node scripts/serve.mjs [--port 3000] [--host 127.0.0.1] [--dir dist-web] [--https]
// Plain HTTP on 127.0.0.1 is enough for the offline preview page. Excel needs HTTPS for the task
// pane: pass --https and it uses the localhost certificate that office-addin-dev-certs installs
// (~/.office-addin-dev-certs/localhost.crt / localhost.key), or TAILMARK_CERT / TAILMARK_KEY.
import { createReadStream, existsSync, readFileSync, statSync } from 'node:fs';
import http from 'node:http';
import https from 'node:https';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
export const DEFAULT_DIR = path.resolve(here, '..', 'dist-web');

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.png': 'image/png',
  '.svg': 'image/svg+xml',
  '.ico': 'image/x-icon',
  '.xml': 'application/xml; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.txt': 'text/plain; charset=utf-8',
};

/** Finds the certificate for HTTPS, or null. */
export function findCertificate() {
  const cert = process.env.TAILMARK_CERT ?? path.join(os.homedir(), '.office-addin-dev-certs', 'localhost.crt');
  const key = process.env.TAILMARK_KEY ?? path.join(os.homedir(), '.office-addin-dev-certs', 'localhost.key');
  if (existsSync(cert) && existsSync(key)) return { cert: readFileSync(cert), key: readFileSync(key) };
  return null;
}

function handler(dir) {
  const rootDir = path.resolve(dir);
  return (req, res) => {
    let pathname;
    try {
      pathname = decodeURIComponent(new URL(req.url ?? '/', 'http://localhost').pathname);
    } catch {
      res.writeHead(400).end('Bad request');
      return;
    }
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      res.writeHead(405, { Allow: 'GET, HEAD' }).end();
      return;
    }
    if (pathname === '/') pathname = '/preview.html';
    const file = path.resolve(rootDir, '.' + pathname);
    if (file !== rootDir && !file.startsWith(rootDir + path.sep)) {
      res.writeHead(403).end('Forbidden');
      return;
    }
    let stat;
    try {
      stat = statSync(file);
    } catch {
      res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8' }).end('Not found');
      return;
    }
    if (!stat.isFile()) {
      res.writeHead(404).end('Not found');
      return;
    }
    res.writeHead(200, {
      'Content-Type': TYPES[path.extname(file).toLowerCase()] ?? 'application/octet-stream',
      'Content-Length': stat.size,
      'Cache-Control': 'no-store',
      'X-Content-Type-Options': 'nosniff',
      'Referrer-Policy': 'no-referrer',
    });
    if (req.method === 'HEAD') res.end();
    else createReadStream(file).pipe(res);
  };
}

/**
 * Starts the server. port 0 picks a free port. Resolves to { url, port, close }.
 * @param {{ dir?: string, port?: number, host?: string, tls?: { cert: Buffer, key: Buffer } | null }} [options]
 */
export function startServer(options = {}) {
  const dir = options.dir ?? DEFAULT_DIR;
  const host = options.host ?? '127.0.0.1';
  const tls = options.tls ?? null;
  const server = tls ? https.createServer(tls, handler(dir)) : http.createServer(handler(dir));
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? 3000, host, () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      const shownHost = host === '127.0.0.1' && tls ? 'localhost' : host;
      resolve({
        url: `${tls ? 'https' : 'http'}://${shownHost}:${port}`,
        port,
        close: () => new Promise((done) => server.close(() => done())),
      });
    });
  });
}

function arg(name, fallback) {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] && !process.argv[i + 1].startsWith('--') ? process.argv[i + 1] : fallback;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const wantHttps = process.argv.includes('--https');
  const tls = wantHttps ? findCertificate() : null;
  if (wantHttps && !tls) {
    console.error(
      'No localhost certificate found for HTTPS. Install one with "npx office-addin-dev-certs install" ' +
        '(or set TAILMARK_CERT and TAILMARK_KEY to a certificate and key), then run "npm run serve:https" again.',
    );
    process.exit(1);
  }
  const dir = path.resolve(arg('dir', DEFAULT_DIR));
  if (!existsSync(path.join(dir, 'preview.html'))) {
    console.error(`${dir} has no preview.html: run "npm run build" first.`);
    process.exit(1);
  }
  const { url } = await startServer({ dir, port: Number(arg('port', '3000')), host: arg('host', '127.0.0.1'), tls });
  console.log(`Tailmark is served from ${dir}`);
  console.log(`  Preview (offline, not Excel): ${url}/preview.html`);
  console.log(`  Task pane page:               ${url}/taskpane.html`);
  if (!tls) console.log('  For Excel, serve over HTTPS: npm run serve:https (see scripts/README.md).');
  console.log('Press Ctrl+C to stop.');
}

#!/usr/bin/env node
/**
 * A small static server for the built app (build/), as a static host would serve it:
 * files as they are, and 200.html (the single-page fallback) for any other page path.
 * Binds 127.0.0.1 only.
 *
 *   node scripts/serve-build.mjs [--port 4173] [--root build]
 *
 * Also imported by scripts/start.mjs (serveBuild).
 */
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { createServer } from 'node:http';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { pathToFileURL } from 'node:url';

export const DEFAULT_PORT = 4173;
export const HOST = '127.0.0.1';
const FALLBACK = '200.html';

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.webmanifest': 'application/manifest+json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.ico': 'image/x-icon',
  '.txt': 'text/plain; charset=utf-8',
  '.csv': 'text/csv; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.woff': 'font/woff',
  '.woff2': 'font/woff2',
  '.ttf': 'font/ttf',
  '.wasm': 'application/wasm'
};

async function fileAt(path) {
  try {
    const s = await stat(path);
    return s.isFile() ? s : null;
  } catch {
    return null;
  }
}

/** Resolves a URL path inside `root`, or null when it would leave it. */
function inside(root, urlPath) {
  let decoded;
  try {
    decoded = decodeURIComponent(urlPath);
  } catch {
    return null;
  }
  if (decoded.includes('\0')) return null;
  const path = normalize(join(root, decoded));
  return path === root || path.startsWith(root + sep) ? path : null;
}

/** The HTTP server for `root`; call `.listen(port, HOST)` on it. */
export function createBuildServer(rootDir = 'build') {
  const root = resolve(rootDir);

  return createServer(async (req, res) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      res.writeHead(405, { allow: 'GET, HEAD' }).end();
      return;
    }
    const urlPath = new URL(req.url ?? '/', 'http://localhost').pathname;
    const path = inside(root, urlPath);
    if (!path) {
      res.writeHead(400).end('bad path');
      return;
    }

    let file = path;
    let info = await fileAt(file);
    if (!info && urlPath.endsWith('/')) info = await fileAt((file = join(path, 'index.html')));
    if (!info && !extname(urlPath)) info = await fileAt((file = `${path}.html`));
    // A page path the build has no file for is the single-page app's business; a missing
    // asset (it has an extension) is a real 404, so a broken build shows as one.
    if (!info && (!extname(urlPath) || extname(urlPath) === '.html')) {
      info = await fileAt((file = join(root, FALLBACK)));
    }
    if (!info) {
      res.writeHead(404, { 'content-type': 'text/plain; charset=utf-8' }).end(`not found: ${urlPath}`);
      return;
    }

    const immutable = urlPath.startsWith('/_app/immutable/');
    res.writeHead(200, {
      'content-type': TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream',
      'content-length': info.size,
      'cache-control': immutable ? 'public, max-age=31536000, immutable' : 'no-cache',
      'x-content-type-options': 'nosniff'
    });
    if (req.method === 'HEAD') {
      res.end();
      return;
    }
    createReadStream(file).pipe(res);
  });
}

/** Serves `root` on http://127.0.0.1:`port`; resolves with the server once it listens. */
export function serveBuild({ root = 'build', port = DEFAULT_PORT } = {}) {
  const server = createBuildServer(root);
  return new Promise((resolvePromise, reject) => {
    server.once('error', reject);
    server.listen(port, HOST, () => {
      server.off('error', reject);
      resolvePromise(server);
    });
  });
}

function argValue(argv, name) {
  const i = argv.indexOf(name);
  return i >= 0 ? argv[i + 1] : undefined;
}

async function main(argv) {
  const port = Number(argValue(argv, '--port') ?? process.env.PORT ?? DEFAULT_PORT);
  const root = argValue(argv, '--root') ?? 'build';
  if (!(await fileAt(join(resolve(root), FALLBACK)))) {
    console.error(`serve-build: ${join(root, FALLBACK)} is missing; run \`npm run build\` first.`);
    process.exit(1);
  }
  try {
    await serveBuild({ root, port });
  } catch (err) {
    console.error(
      err.code === 'EADDRINUSE'
        ? `serve-build: port ${port} on ${HOST} is already in use; stop what uses it or pass --port.`
        : `serve-build: ${err.message}`
    );
    process.exit(1);
  }
  console.log(`Serving ${root}/ on http://${HOST}:${port}/`);
  const stop = () => process.exit(0);
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  await main(process.argv.slice(2));
}

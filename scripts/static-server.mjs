// A minimal static file server for dist/, bound to loopback only.
// Usage: node scripts/static-server.mjs DIR [HOST] [PORT]   (DIR is served at /)
// PORT 0 picks a free port. Prints "listening http://HOST:PORT/" once bound.
import { createServer } from 'node:http';
import { readFile, stat } from 'node:fs/promises';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { headersFor } from './page-policy.mjs';

const [dirArg = 'dist', host = '127.0.0.1', portArg = '8080'] = process.argv.slice(2);
const root = resolve(dirArg);
const types = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.wasm': 'application/wasm',
  '.json': 'application/json',
  '.webmanifest': 'application/manifest+json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.txt': 'text/plain; charset=utf-8',
};

if (!['127.0.0.1', 'localhost', '::1'].includes(host)) {
  console.error(`static-server: refusing to bind ${host}: loopback only`);
  process.exit(2);
}

// TERN_LOG_REQUESTS=1: print every request received ("request GET /path"),
// so that a browser test can see exactly what reached the host.
const logRequests = process.env.TERN_LOG_REQUESTS === '1';
// TERN_HEADERS=1: send the headers README documents for hosts that set them.
const sendHeaders = process.env.TERN_HEADERS === '1';

const server = createServer(async (req, res) => {
  if (logRequests) console.log(`request ${req.method} ${req.url}`);
  try {
    const url = new URL(req.url, 'http://localhost');
    let path = normalize(join(root, decodeURIComponent(url.pathname)));
    if (path !== root && !path.startsWith(root + sep)) {
      res.writeHead(403).end('forbidden');
      return;
    }
    let info = await stat(path).catch(() => null);
    if (info && info.isDirectory()) {
      path = join(path, 'index.html');
      info = await stat(path).catch(() => null);
    }
    if (!info) {
      res.writeHead(404, { 'content-type': 'text/plain' }).end('not found');
      return;
    }
    const body = await readFile(path);
    res.writeHead(200, {
      'content-type': types[extname(path)] || 'application/octet-stream',
      'cache-control': 'no-store',
      ...(sendHeaders ? headersFor(path) : {}),
    });
    res.end(body);
  } catch (e) {
    res.writeHead(500).end(String(e));
  }
});

server.listen(Number(portArg), host, () => {
  const { port } = server.address();
  const shown = host.includes(':') ? `[${host}]` : host;
  console.log(`listening http://${shown}:${port}/`);
});
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => server.close(() => process.exit(0)));

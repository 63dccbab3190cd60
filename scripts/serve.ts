/**
 * The production web server: `node --import tsx scripts/serve.ts` after `astro build`.
 *
 * Astro's node adapter runs in middleware mode (astro.config.mjs); this server owns the socket.
 * Before any route sees a request it decides who the client is: a peer that is not listed in
 * TRUST_PROXY is the client, and every X-Forwarded-* / Forwarded / X-Real-IP header it sent is
 * dropped; behind trusted proxies the client is the right-most X-Forwarded-For address that is
 * not a trusted proxy. Either way X-Forwarded-For then holds exactly that one address, which is
 * what Astro reports as ctx.clientAddress. It also serves the built static files (dist/client,
 * /_astro/ with a year's immutable caching, as the adapter's standalone server did), refuses a
 * declared body larger than any route accepts, starts the background jobs (src/server/jobs.ts)
 * and stops gracefully on SIGTERM / SIGINT.
 */
import { createReadStream, readdirSync, statSync } from 'node:fs';
import http, { type IncomingMessage, type ServerResponse } from 'node:http';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { env } from '../src/config';
import { clientAddressFrom, parseTrustProxy, type TrustedProxies } from '../src/lib/net';
import { MAX_UPLOAD_BYTES } from '../src/lib/csv/format';
import { startBackgroundJobs } from '../src/server/jobs';

type AstroHandler = (req: IncomingMessage, res: ServerResponse) => Promise<void>;

const DIST = fileURLToPath(new URL('../dist/', import.meta.url));
const CLIENT_DIR = path.join(DIST, 'client');
const ENTRY = path.join(DIST, 'server', 'entry.mjs');

/**
 * A coarse guard only: the largest body any route accepts is a logger CSV upload (5 MB plus
 * multipart framing). Twice that plus 2 MB (12 MB) leaves a body just over a route's cap to the
 * route, which answers with its own message; this only stops the absurd before it is read.
 */
export const MAX_REQUEST_BYTES = 2 * MAX_UPLOAD_BYTES + 2 * 1024 * 1024;
/** How long in-flight requests may take to finish after SIGTERM / SIGINT. */
const SHUTDOWN_GRACE_MS = 10_000;
const IMMUTABLE = 'public, max-age=31536000, immutable';

const FORWARDING_HEADER = /^(?:x-forwarded-.+|forwarded|x-real-ip)$/;

/** Runs before Astro: after it, X-Forwarded-For is the one client address we determined, or absent. */
export function settleClientAddress(req: IncomingMessage, trusted: TrustedProxies): void {
  const peer = req.socket.remoteAddress ?? '';
  const client = clientAddressFrom(peer, req.headers['x-forwarded-for'], trusted);
  if (!trusted.has(peer)) {
    for (const name of Object.keys(req.headers)) if (FORWARDING_HEADER.test(name)) delete req.headers[name];
  } else {
    // Only X-Forwarded-For is interpreted here; RFC 7239 Forwarded and X-Real-IP are not, so they go.
    delete req.headers.forwarded;
    delete req.headers['x-real-ip'];
  }
  if (client) req.headers['x-forwarded-for'] = client;
  else delete req.headers['x-forwarded-for'];
}

const CONTENT_TYPES: Record<string, string> = {
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.html': 'text/html; charset=utf-8',
  '.json': 'application/json',
  '.map': 'application/json',
  '.txt': 'text/plain; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.jpeg': 'image/jpeg',
  '.webp': 'image/webp',
  '.avif': 'image/avif',
  '.gif': 'image/gif',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.woff': 'font/woff',
  '.ttf': 'font/ttf',
  '.webmanifest': 'application/manifest+json',
  '.xml': 'application/xml',
};

interface StaticFile {
  file: string;
  size: number;
  mtime: Date;
  etag: string;
  type: string;
  cacheControl: string;
}

/**
 * Every file of the build's client directory, read once at start (the build does not change
 * under a running server). Only these exact paths are ever served, so no request path can
 * reach outside the directory; dot-files are left out.
 */
export function indexStaticFiles(root: string): Map<string, StaticFile> {
  const files = new Map<string, StaticFile>();
  const walk = (dir: string, urlPrefix: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      if (entry.name.startsWith('.')) continue;
      const full = path.join(dir, entry.name);
      const urlPath = `${urlPrefix}/${entry.name}`;
      if (entry.isDirectory()) walk(full, urlPath);
      else if (entry.isFile()) {
        const st = statSync(full);
        files.set(urlPath, {
          file: full,
          size: st.size,
          mtime: st.mtime,
          etag: `W/"${st.size.toString(16)}-${Math.floor(st.mtimeMs).toString(16)}"`,
          type: CONTENT_TYPES[path.extname(entry.name).toLowerCase()] ?? 'application/octet-stream',
          cacheControl: urlPath.startsWith('/_astro/') ? IMMUTABLE : 'public, max-age=0',
        });
      }
    }
  };
  walk(root, '');
  return files;
}

function serveStatic(req: IncomingMessage, res: ServerResponse, files: Map<string, StaticFile>, pathname: string): boolean {
  if (req.method !== 'GET' && req.method !== 'HEAD') return false;
  const hit = files.get(pathname);
  if (!hit) return false;
  res.setHeader('content-type', hit.type);
  res.setHeader('cache-control', hit.cacheControl);
  res.setHeader('etag', hit.etag);
  res.setHeader('last-modified', hit.mtime.toUTCString());
  res.setHeader('x-content-type-options', 'nosniff');
  const ifNoneMatch = req.headers['if-none-match'];
  const ifModifiedSince = req.headers['if-modified-since'];
  const notModified =
    ifNoneMatch !== undefined
      ? ifNoneMatch.split(',').some((t) => t.trim() === hit.etag || t.trim() === '*')
      : ifModifiedSince !== undefined && Date.parse(ifModifiedSince) >= Math.floor(hit.mtime.getTime() / 1000) * 1000;
  if (notModified) {
    res.statusCode = 304;
    res.end();
    return true;
  }
  res.setHeader('content-length', hit.size);
  if (req.method === 'HEAD') {
    res.end();
    return true;
  }
  const stream = createReadStream(hit.file);
  stream.on('error', (err) => {
    console.error(`[plateau] could not read ${hit.file}:`, err);
    res.destroy(err);
  });
  stream.pipe(res);
  return true;
}

function plainError(res: ServerResponse, status: number, code: string, message: string, close = false): void {
  const body = JSON.stringify({ error: { code, message } });
  res.writeHead(status, {
    'content-type': 'application/json; charset=utf-8',
    'content-length': Buffer.byteLength(body),
    'x-content-type-options': 'nosniff',
    ...(close ? { connection: 'close' } : {}),
  });
  res.end(body);
}

export function createRequestListener(astro: AstroHandler, trusted: TrustedProxies, files: Map<string, StaticFile>, isStopping: () => boolean) {
  return (req: IncomingMessage, res: ServerResponse): void => {
    if (isStopping()) res.setHeader('connection', 'close');
    let pathname: string;
    try {
      pathname = decodeURI((req.url ?? '/').split(/[?#]/, 1)[0]!);
    } catch {
      plainError(res, 400, 'bad_request', 'The request path is not valid.');
      return;
    }
    const declared = Number(req.headers['content-length'] ?? 0);
    if (declared > MAX_REQUEST_BYTES) {
      plainError(res, 413, 'too_large', `The request body is over ${Math.round(MAX_REQUEST_BYTES / 1024 / 1024)} MB.`, true);
      return;
    }
    settleClientAddress(req, trusted);
    if (serveStatic(req, res, files, pathname)) return;
    astro(req, res).catch((err: unknown) => {
      console.error('[plateau] request failed:', err);
      if (!res.headersSent) plainError(res, 500, 'internal', 'Something went wrong on our side.');
      else res.destroy();
    });
  };
}

async function main(): Promise<void> {
  let trusted: TrustedProxies;
  try {
    trusted = parseTrustProxy(env().TRUST_PROXY);
    // Secure cookies and the origin check are derived from PUBLIC_URL: it must be a plain http(s) origin.
    if (!/^https?:$/.test(URL.canParse(env().PUBLIC_URL) ? new URL(env().PUBLIC_URL).protocol : ''))
      throw new Error(`PUBLIC_URL: "${env().PUBLIC_URL}" must be an http or https address.`);
  } catch (err) {
    // Each zod issue names its variable (and TRUST_PROXY's its entry).
    const issues = (err as { issues?: { path: PropertyKey[]; message: string }[] }).issues;
    const lines = issues
      ? issues.map((i) => {
          const name = i.path.map(String).join('.');
          return i.message.startsWith(name) ? i.message : `${name}: ${i.message}`;
        })
      : [(err as Error).message];
    console.error(`[plateau] The environment is not valid; not starting.\n  ${lines.join('\n  ')}`);
    process.exit(1);
  }
  const host = process.env.HOST || '127.0.0.1';
  const port = Number(process.env.PORT || 4321);
  const { handler } = (await import(pathToFileURL(ENTRY).href)) as { handler?: AstroHandler };
  if (typeof handler !== 'function') {
    console.error(`[plateau] ${ENTRY} exports no handler: build with the node adapter in middleware mode (astro.config.mjs).`);
    process.exit(1);
  }
  // The outbox sender and the daily digest check: started here, once per process, never from a request.
  startBackgroundJobs();
  const files = indexStaticFiles(CLIENT_DIR);

  let stopping = false;
  const listener = createRequestListener(handler, trusted, files, () => stopping);
  // Responses in flight, so a stop can tell their connections not to stay open afterwards.
  const inFlight = new Set<ServerResponse>();
  const server = http.createServer((req, res) => {
    inFlight.add(res);
    res.on('close', () => {
      inFlight.delete(res);
      if (stopping) setImmediate(() => server.closeIdleConnections());
    });
    listener(req, res);
  });
  // A malformed request or one whose headers pass Node's limit gets a proper answer (431 / 400)
  // with the security headers, and the socket is ended gently (the rest of what the client is
  // still sending is read and dropped), so the client reads the answer instead of a reset.
  server.on('clientError', (err: NodeJS.ErrnoException, socket) => {
    if (!socket.writable || (socket as { _httpMessage?: unknown })._httpMessage) {
      socket.destroy();
      return;
    }
    const tooLarge = err.code === 'HPE_HEADER_OVERFLOW';
    const status = tooLarge ? '431 Request Header Fields Too Large' : '400 Bad Request';
    const body = JSON.stringify({
      error: {
        code: tooLarge ? 'headers_too_large' : 'bad_request',
        message: tooLarge ? 'The request line or headers are too large.' : 'The request could not be read.',
      },
    });
    socket.on('error', () => {});
    socket.resume();
    socket.end(
      `HTTP/1.1 ${status}\r\nContent-Type: application/json; charset=utf-8\r\nContent-Length: ${Buffer.byteLength(body)}\r\nX-Content-Type-Options: nosniff\r\nX-Frame-Options: DENY\r\nContent-Security-Policy: default-src 'none'; frame-ancestors 'none'\r\nConnection: close\r\n\r\n${body}`,
    );
    setTimeout(() => socket.destroy(), 2000).unref();
  });
  server.on('error', (err) => {
    console.error(`[plateau] The server could not start on ${host}:${port}:`, err.message);
    process.exit(1);
  });

  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[plateau] ${signal}: finishing requests in flight, then stopping.`);
    server.close(() => process.exit(0));
    for (const res of inFlight) if (!res.headersSent) res.shouldKeepAlive = false;
    server.closeIdleConnections();
    setTimeout(() => {
      server.closeAllConnections();
      process.exit(0);
    }, SHUTDOWN_GRACE_MS).unref();
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));

  server.listen(port, host, () => {
    const proxies = trusted.entries.length ? trusted.entries.join(', ') : 'none (X-Forwarded-* dropped)';
    console.log(`[plateau] Listening on http://${host.includes(':') ? `[${host}]` : host}:${port}; trusted proxies: ${proxies}`);
  });
}

// Importing this module (for its pieces) starts nothing; running it starts the server.
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) await main();

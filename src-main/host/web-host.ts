/**
 * The local web host: the same handlers over HTTP, for machines without the Electron
 * binary and for the end-to-end tests. Listens on 127.0.0.1 only; every request must carry
 * the random per-run token. The browser gets it without the token ever appearing on a
 * command line (which other local users can read in /proc/<pid>/cmdline): the launcher
 * asks for a one-time launch address `/launch/<code>` (`launchUrl()`), hands that to the
 * browser through a file only the user can read, and the first request to it sets an
 * HttpOnly, SameSite=Strict cookie holding the token and consumes the code. API calls
 * carry the token in the `x-railwright-token` header, or the cookie together with the
 * `x-railwright-request` header (a cross-site page can send neither without a CORS
 * preflight, which this host never approves). Tests may still open `?token=` directly.
 * The Host header must name the loopback address (defeats DNS rebinding).
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { CONTENT_SECURITY_POLICY } from '../../electron.config.ts';
import type { Api } from '../api/index.ts';
import type { EventName, Events } from '../api/contract.ts';

export interface WebHostOptions {
  api: Api;
  /** The built window (out/renderer). */
  rendererDir: string;
  port?: number;
  token?: string;
}

export interface WebHost {
  url: string;
  /** The address with the token in its query (tests open it directly; never put it on a command line). */
  entryUrl: string;
  /** A new one-time launch address: it works once, then sets the token cookie and opens the window. */
  launchUrl(): string;
  token: string;
  port: number;
  /** Send an event to every connected window. */
  broadcast<E extends EventName>(event: E, payload: Events[E]): void;
  close(): Promise<void>;
}

const MIME: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml', '.png': 'image/png', '.json': 'application/json', '.woff2': 'font/woff2', '.ico': 'image/x-icon',
};
const MAX_BODY = 16 * 1024 * 1024;
const COOKIE = 'railwright_token';

export function newToken(): string {
  return randomBytes(24).toString('base64url');
}

function same(a: string | undefined | null, b: string): boolean {
  if (typeof a !== 'string') return false;
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

function cookieToken(req: IncomingMessage): string | null {
  const c = req.headers.cookie;
  if (!c) return null;
  for (const part of c.split(';')) {
    const [k, ...v] = part.trim().split('=');
    if (k === COOKIE) return v.join('=');
  }
  return null;
}

function baseHeaders(res: ServerResponse): void {
  res.setHeader('Content-Security-Policy', CONTENT_SECURITY_POLICY);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Referrer-Policy', 'no-referrer');
  res.setHeader('Cache-Control', 'no-store');
  res.setHeader('Cross-Origin-Opener-Policy', 'same-origin');
  res.setHeader('Cross-Origin-Resource-Policy', 'same-origin');
  res.setHeader('X-Frame-Options', 'DENY');
}

function send(res: ServerResponse, status: number, body: string, type = 'text/plain; charset=utf-8'): void {
  res.statusCode = status;
  res.setHeader('Content-Type', type);
  res.end(body);
}

async function readBody(req: IncomingMessage): Promise<string> {
  const chunks: Buffer[] = [];
  let n = 0;
  for await (const c of req) {
    n += (c as Buffer).length;
    if (n > MAX_BODY) throw new Error('request body too large');
    chunks.push(c as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

/** The page a used launch code answers with: it moves on to the window from this origin. */
const LAUNCHED_PAGE = '<!doctype html><meta charset="utf-8"><meta http-equiv="refresh" content="0;url=/"><title>Railwright</title><p>Opening Railwright… <a href="/">Continue</a></p>\n';

export async function startWebHost(opts: WebHostOptions): Promise<WebHost> {
  const token = opts.token ?? newToken();
  const launchCodes = new Set<string>();
  const root = resolve(opts.rendererDir);
  const streams = new Set<ServerResponse>();
  let port = 0;

  const server = createServer((req, res) => {
    void handle(req, res).catch((e) => {
      if (!res.headersSent) send(res, 500, `internal error: ${(e as Error).message}`);
      else res.end();
    });
  });

  async function handle(req: IncomingMessage, res: ServerResponse): Promise<void> {
    baseHeaders(res);
    const host = req.headers.host ?? '';
    if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) return send(res, 421, 'wrong host');
    let url: URL;
    let rel: string;
    try {
      url = new URL(req.url ?? '/', `http://127.0.0.1:${port}`);
      rel = decodeURIComponent(url.pathname);
    } catch {
      return send(res, 400, `malformed address: ${String(req.url).slice(0, 200)} is not a valid path (bad percent escape)`);
    }
    const headerToken = req.headers['x-railwright-token'];

    if (url.pathname.startsWith('/launch/') && (req.method === 'GET' || req.method === 'HEAD')) {
      const code = url.pathname.slice('/launch/'.length);
      if (!launchCodes.has(code)) return send(res, 401, 'this launch address is wrong or was already used: start Railwright again for a new one');
      launchCodes.delete(code);
      res.setHeader('Set-Cookie', `${COOKIE}=${token}; HttpOnly; SameSite=Strict; Path=/`);
      // A 200 page rather than a redirect: a SameSite=Strict cookie is not sent on a
      // redirect that a page of another site (or a local file) started.
      return send(res, 200, LAUNCHED_PAGE, 'text/html; charset=utf-8');
    }

    if (url.pathname.startsWith('/api/')) {
      // API calls need the token header, or the cookie plus the request header: a
      // cross-site page cannot set either header without a CORS preflight, which this host
      // never approves, and a SameSite=Strict cookie is not sent cross-site at all.
      const viaHeader = same(Array.isArray(headerToken) ? headerToken[0] : headerToken, token);
      const viaCookie = req.headers['x-railwright-request'] === '1' && same(cookieToken(req), token);
      if (!viaHeader && !viaCookie) return send(res, 401, 'missing or wrong token');
      if (url.pathname === '/api/request' && req.method === 'POST') {
        if (!(req.headers['content-type'] ?? '').startsWith('application/json')) return send(res, 415, 'expected application/json');
        let parsed: unknown;
        try {
          parsed = JSON.parse(await readBody(req));
        } catch (e) {
          return send(res, 400, JSON.stringify({ ok: false, error: { message: `malformed request: ${(e as Error).message}` } }), 'application/json');
        }
        const p = (parsed && typeof parsed === 'object' ? parsed : {}) as { name?: unknown; args?: unknown };
        const result = await opts.api.request(p.name, p.args);
        let text: string;
        try {
          text = JSON.stringify(result);
        } catch (e) {
          // An answer that cannot be written (a value nested too deeply) is still an answer.
          text = JSON.stringify({ ok: false, error: { message: `the answer to ${String(p.name).slice(0, 80)} could not be sent (${(e as Error).message}); the open project may hold a value nested too deeply: open another project` } });
        }
        return send(res, 200, text, 'application/json');
      }
      if (url.pathname === '/api/events' && req.method === 'GET') {
        res.statusCode = 200;
        res.setHeader('Content-Type', 'text/event-stream');
        res.setHeader('Connection', 'keep-alive');
        res.flushHeaders();
        res.write(': connected\n\n');
        streams.add(res);
        const ping = setInterval(() => res.write(': ping\n\n'), 15_000);
        req.on('close', () => {
          clearInterval(ping);
          streams.delete(res);
        });
        return;
      }
      return send(res, 404, 'no such endpoint');
    }

    if (req.method !== 'GET' && req.method !== 'HEAD') return send(res, 405, 'method not allowed');
    const queryToken = url.searchParams.get('token');
    const authorised = same(cookieToken(req), token) || same(queryToken, token);
    if (!authorised) return send(res, 401, 'missing or wrong token: open the address printed at start-up');
    if (same(queryToken, token)) {
      res.setHeader('Set-Cookie', `${COOKIE}=${token}; HttpOnly; SameSite=Strict; Path=/`);
    }
    if (rel === '/' || rel === '') rel = '/index.html';
    const file = normalize(join(root, rel));
    if (!file.startsWith(root + sep)) return send(res, 403, 'outside the window folder');
    let body: Buffer;
    try {
      body = await readFile(file);
    } catch {
      return send(res, 404, 'not found');
    }
    res.statusCode = 200;
    res.setHeader('Content-Type', MIME[extname(file)] ?? 'application/octet-stream');
    res.end(req.method === 'HEAD' ? undefined : body);
  }

  await new Promise<void>((ok, fail) => {
    server.once('error', fail);
    server.listen(opts.port ?? 0, '127.0.0.1', () => ok());
  });
  const addr = server.address();
  port = typeof addr === 'object' && addr ? addr.port : 0;
  const url = `http://127.0.0.1:${port}/`;

  const broadcast = <E extends EventName>(event: E, payload: Events[E]) => {
    const data = `event: ${event}\ndata: ${JSON.stringify(payload)}\n\n`;
    for (const s of streams) s.write(data);
  };

  return {
    url,
    entryUrl: `${url}?token=${token}`,
    launchUrl: () => {
      const code = newToken();
      launchCodes.add(code);
      return `${url}launch/${code}`;
    },
    token,
    port,
    broadcast,
    close: () => new Promise<void>((ok) => {
      for (const s of streams) s.end();
      streams.clear();
      server.closeAllConnections?.();
      server.close(() => ok());
    }),
  };
}

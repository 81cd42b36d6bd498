// The preview's web server: node:http on the loopback interface only, a fixed set of routes (the
// page, the shot's state, frames, ghost marks, the visibility curve, an event stream, and the
// write-back), never a file by its path. Requests must name this server as their Host (a page on
// another site that resolves its name to 127.0.0.1 gets 403), and the write-back takes only a JSON
// body from the page's own origin. The shot and every file it reads are watched (chokidar); a save
// reloads the shot and tells the page, which draws its frame again.

import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { watch, type FSWatcher } from 'chokidar';
import { writeFileAtomic } from '../io/atomic-write.js';
import type { ElementName } from '../shot/types.js';
import { previewPage } from './page.js';
import { PreviewSession, type ElementSetting, type PreviewOptions } from './session.js';
import { writeBack } from './write-back.js';

export interface PreviewServer {
  url: string;
  port: number;
  session: PreviewSession;
  close(): Promise<void>;
}

export interface StartOptions extends PreviewOptions {
  /** 0: any free port */
  port: number;
  /** what the server tells its user (reloads, errors, writes) */
  log?: (line: string) => void;
  /** how long to wait for more saves before reloading, ms (editors write in several steps) */
  settleMs?: number;
}

const MAX_BODY = 64 * 1024;

export async function startPreview(o: StartOptions): Promise<PreviewServer> {
  const log = o.log ?? (() => {});
  const session = new PreviewSession(o);
  const first = await session.load();
  if (!first.ok) for (const e of first.errors) log(e);
  const clients = new Set<ServerResponse>();
  let port = 0;

  const send = (res: ServerResponse, status: number, type: string, body: string | Buffer, headers: Record<string, string> = {}) => {
    res.writeHead(status, { 'Content-Type': type, 'Cache-Control': 'no-store', 'X-Content-Type-Options': 'nosniff', ...headers });
    res.end(body);
  };
  const json = (res: ServerResponse, value: unknown, status = 200) => send(res, status, 'application/json; charset=utf-8', JSON.stringify(value));
  const broadcast = (event: unknown) => {
    for (const c of clients) c.write(`data: ${JSON.stringify(event)}\n\n`);
  };

  // --- watching the shot's files
  let watcher: FSWatcher | undefined;
  let timer: NodeJS.Timeout | undefined;
  let changedFile = '';
  const rewatch = () => {
    const want = session.watched();
    if (!watcher) {
      watcher = watch(want, { ignoreInitial: true, depth: 0 });
      watcher.on('all', (_event, file) => {
        changedFile = file;
        clearTimeout(timer);
        timer = setTimeout(reload, o.settleMs ?? 25);
      });
      watcher.on('error', (e) => log(`watching: ${e instanceof Error ? e.message : String(e)}`));
      return;
    }
    const have = Object.entries(watcher.getWatched()).flatMap(([dir, names]) => names.map((n) => path.join(dir, n)));
    const add = want.filter((f) => !have.includes(f));
    if (add.length) watcher.add(add);
  };
  // one load at a time, in the order the saves came
  let loading = Promise.resolve();
  const reload = () => {
    loading = loading.then(doReload).catch((e) => log(`preview: ${e instanceof Error ? e.message : String(e)}`));
  };
  const doReload = async () => {
    const r = await session.load();
    rewatch();
    const shown = path.relative(process.cwd(), changedFile) || changedFile;
    if (r.ok) log(`${shown} changed: shot reloaded in ${r.ms.toFixed(0)} ms`);
    else for (const e of r.errors) log(e);
    broadcast({ type: 'reloaded', version: session.state().version, changed: path.basename(changedFile), errors: r.errors });
  };
  rewatch();

  const settingsOf = (q: URLSearchParams): Partial<Record<ElementName, ElementSetting>> => {
    const out: Partial<Record<ElementName, ElementSetting>> = {};
    for (const part of (q.get('el') ?? '').split(',')) {
      const [name, on, gain] = part.split(':');
      const g = Number(gain);
      if (name && Number.isFinite(g) && g >= 0) out[name as ElementName] = { on: on === '1', gain: g };
    }
    return out;
  };

  const handle = async (req: IncomingMessage, res: ServerResponse) => {
    const host = req.headers.host ?? '';
    if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) return send(res, 403, 'text/plain', 'this server answers only to its own address\n');
    let url: URL;
    try {
      url = new URL(req.url ?? '/', `http://${host}`);
    } catch {
      return send(res, 400, 'text/plain', 'bad request\n');
    }
    const route = `${req.method} ${url.pathname}`;
    const q = url.searchParams;
    switch (route) {
      case 'GET /': {
        const nonce = randomBytes(16).toString('base64');
        return send(res, 200, 'text/html; charset=utf-8', previewPage(nonce), { 'Content-Security-Policy': `default-src 'self'; script-src 'nonce-${nonce}'; style-src 'nonce-${nonce}'; img-src 'self' blob:; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'` });
      }
      case 'GET /favicon.ico':
        res.writeHead(204).end();
        return;
      case 'GET /api/state':
        return json(res, session.state());
      case 'GET /api/frame':
      case 'GET /api/ghosts': {
        const n = Number(q.get('n'));
        if (!session.hasFrame(n)) return json(res, { error: `no frame ${q.get('n')} in the shot` }, 404);
        if (route === 'GET /api/ghosts') return json(res, session.ghosts(n));
        const f = await session.frame(n, settingsOf(q), q.get('plate') === '1');
        return send(res, 200, 'image/png', f.png, { 'X-Render-Ms': f.ms.toFixed(1), 'X-Cached': f.cached ? '1' : '0', ...(f.note ? { 'X-Note': encodeURIComponent(f.note) } : {}) });
      }
      case 'GET /api/visibility':
        if (!session.state().showing) return json(res, { error: 'the shot has not loaded' }, 409);
        return json(res, session.visibility());
      case 'GET /events':
        res.writeHead(200, { 'Content-Type': 'text/event-stream', 'Cache-Control': 'no-store', Connection: 'keep-alive' });
        res.write(': connected\n\n');
        clients.add(res);
        req.on('close', () => clients.delete(res));
        return;
      case 'POST /api/write':
        return writeRoute(req, res, host);
      default:
        return send(res, 404, 'text/plain', 'not found\n');
    }
  };

  const writeRoute = async (req: IncomingMessage, res: ServerResponse, host: string) => {
    const origin = req.headers.origin;
    if ((origin !== undefined && origin !== `http://${host}`) || !(req.headers['content-type'] ?? '').startsWith('application/json')) return send(res, 403, 'text/plain', 'write-back takes JSON from the preview page only\n');
    const chunks: Buffer[] = [];
    let size = 0;
    for await (const c of req) {
      size += (c as Buffer).length;
      if (size > MAX_BODY) return send(res, 413, 'text/plain', 'too large\n');
      chunks.push(c as Buffer);
    }
    let body: { elements?: Partial<Record<ElementName, ElementSetting>> };
    try {
      body = JSON.parse(Buffer.concat(chunks).toString('utf8'));
    } catch {
      return json(res, { error: 'the request is not JSON' }, 400);
    }
    const state = session.state();
    if (!state.showing || state.errors.length) return json(res, { error: 'the shot file has errors: fix them before writing to it' }, 409);
    const known = new Map(state.showing.elements.map((e) => [e.name, e.enabled]));
    const settings: Partial<Record<ElementName, ElementSetting>> = {};
    for (const [name, s] of Object.entries(body.elements ?? {})) {
      if (!known.has(name as ElementName) || !s || typeof s.on !== 'boolean' || typeof s.gain !== 'number' || !Number.isFinite(s.gain) || s.gain < 0) return json(res, { error: `not an element setting: ${name}` }, 400);
      settings[name as ElementName] = s;
    }
    const file = path.resolve(o.shotFile);
    try {
      const out = writeBack(readFileSync(file, 'utf8'), settings, Object.fromEntries(known));
      if (out.changed.length) {
        writeFileAtomic(file, Buffer.from(out.text, 'utf8'));
        log(`${o.shotFile}: wrote ${out.changed.join(', ')}`);
      }
      return json(res, { file: o.shotFile, changed: out.changed });
    } catch (e) {
      return json(res, { error: `${o.shotFile}: not written: ${e instanceof Error ? e.message : String(e)}` }, 500);
    }
  };

  const server = createServer((req, res) => {
    handle(req, res).catch((e) => {
      log(`preview: ${e instanceof Error ? e.message : String(e)}`);
      if (!res.headersSent) send(res, 500, 'text/plain', 'the preview could not draw this; see the terminal\n');
      else res.end();
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(o.port, '127.0.0.1', () => resolve());
  });
  port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}/`,
    port,
    session,
    close: async () => {
      clearTimeout(timer);
      for (const c of clients) c.end();
      await watcher?.close();
      await session.close();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

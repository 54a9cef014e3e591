import { createServer, type Server, type IncomingMessage, type ServerResponse } from 'node:http';
import { createReadStream, existsSync, realpathSync, statSync } from 'node:fs';
import { extname, isAbsolute, join, relative, resolve, sep, basename } from 'node:path';
import { RUN_FILES } from '../run/runFiles.ts';
import { peekRunRecord } from '../run/runDirectory.ts';
import type { RunRecord } from '../run/RunRecord.ts';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ply': 'application/octet-stream',
  '.glb': 'model/gltf-binary',
  '.obj': 'text/plain; charset=utf-8',
  '.csv': 'text/csv; charset=utf-8',
  '.wasm': 'application/wasm',
};

export interface ViewServerOptions {
  /** the built app (viewer/dist) */
  appDir: string;
  /** the run directory the page may read (frames, final state, record), if any */
  runDir?: string;
  /** 0: any free port */
  port?: number;
}

/**
 * Resolve a URL path inside a root directory, or undefined when it would
 * leave it: `..` segments, encoded separators or NUL, absolute or drive
 * paths, and symbolic links pointing outside are all refused.
 */
export function insideRoot(root: string, urlPath: string): string | undefined {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath);
  } catch {
    return undefined;
  }
  if (decoded.includes('\0') || decoded.includes('\\')) return undefined;
  const parts = decoded.split('/').filter((p) => p !== '' && p !== '.');
  if (parts.some((p) => p === '..' || /^[A-Za-z]:/.test(p))) return undefined;
  const target = resolve(root, ...parts);
  const rel = relative(root, target);
  if (rel.startsWith('..') || isAbsolute(rel)) return undefined;
  if (existsSync(target)) {
    const real = realpathSync(target);
    const realRoot = realpathSync(root);
    if (real !== realRoot && !real.startsWith(realRoot + sep)) return undefined;
  }
  return target;
}

/**
 * The viewer's web server: the built app at /, the named run directory's
 * files under /run/ and its listing at /api/run. It binds to 127.0.0.1 only,
 * answers GET and HEAD only, refuses any path that leaves those two
 * directories, and refuses requests whose Host is not the loopback address
 * (so another site cannot reach it through DNS rebinding).
 */
export function startViewServer(o: ViewServerOptions): Promise<{ server: Server; url: string; port: number }> {
  const appDir = resolve(o.appDir);
  const runDir = o.runDir ? resolve(o.runDir) : undefined;
  const server = createServer((req, res) => handle(req, res, appDir, runDir, () => (server.address() as { port: number }).port));
  return new Promise((resolveStart, reject) => {
    server.once('error', (e: NodeJS.ErrnoException) => reject(e.code === 'EADDRINUSE' ? new Error(`port ${o.port} is in use: choose another with --port, or 0 for any free one`) : e));
    server.listen(o.port ?? 0, '127.0.0.1', () => {
      const port = (server.address() as { port: number }).port;
      resolveStart({ server, url: `http://127.0.0.1:${port}/`, port });
    });
  });
}

function refuse(res: ServerResponse, code: number, text: string) {
  res.writeHead(code, { 'Content-Type': 'text/plain; charset=utf-8', 'X-Content-Type-Options': 'nosniff' });
  res.end(text + '\n');
}

function handle(req: IncomingMessage, res: ServerResponse, appDir: string, runDir: string | undefined, port: () => number) {
  if (req.method !== 'GET' && req.method !== 'HEAD') return refuse(res, 405, 'only GET and HEAD');
  const host = req.headers.host ?? '';
  if (host !== `127.0.0.1:${port()}` && host !== `localhost:${port()}`) return refuse(res, 403, 'this server answers only to 127.0.0.1');
  const raw = (req.url ?? '/').split('?')[0].split('#')[0];
  if (!raw.startsWith('/')) return refuse(res, 400, 'bad request path');
  if (raw === '/api/run') return sendJson(res, { run: runDir ? runListing(runDir) : null });
  let root = appDir;
  let path = raw;
  if (raw.startsWith('/run/')) {
    if (!runDir) return refuse(res, 404, 'no run directory');
    root = runDir;
    path = raw.slice('/run'.length);
  }
  if (path === '/') path = '/index.html';
  const file = insideRoot(root, path);
  if (!file) return refuse(res, 403, 'outside the viewer and the run directory');
  if (!existsSync(file) || !statSync(file).isFile()) return refuse(res, 404, 'not found');
  res.writeHead(200, {
    'Content-Type': TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream',
    'Content-Length': statSync(file).size,
    'Cache-Control': 'no-cache',
    'X-Content-Type-Options': 'nosniff',
    // cross-origin isolated: the simulation's threads share memory (SharedArrayBuffer)
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Cross-Origin-Embedder-Policy': 'require-corp',
    'Cross-Origin-Resource-Policy': 'same-origin',
  });
  if (req.method === 'HEAD') return res.end();
  createReadStream(file).pipe(res);
}

function sendJson(res: ServerResponse, data: unknown) {
  const body = JSON.stringify(data);
  res.writeHead(200, { 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'no-cache', 'X-Content-Type-Options': 'nosniff' });
  res.end(body);
}

/** What the page needs of a run directory: its frames with their times, the final state, its scenario and its painting. */
export function runListing(runDir: string): { name: string; frames: { file: string; time: number; step: number }[]; final?: string; scenarioText?: string; status?: string; output?: unknown } {
  const record: Partial<RunRecord> = peekRunRecord(runDir) ?? {};
  const frames = (record.frames ?? []).filter((f) => typeof f.file === 'string' && insideRoot(runDir, '/' + f.file) && existsSync(join(runDir, f.file)));
  return {
    name: basename(runDir),
    frames,
    final: existsSync(join(runDir, RUN_FILES.final)) ? RUN_FILES.final : undefined,
    scenarioText: record.scenarioText,
    status: record.status,
    output: (record.resolved as { output?: unknown } | undefined)?.output,
  };
}

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, mkdirSync, rmSync, writeFileSync, symlinkSync } from 'node:fs';
import { Agent, request } from 'node:http';
import { fileURLToPath } from 'node:url';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Server } from 'node:http';
import { startViewServer, insideRoot } from '../../solver/cli/viewServer.ts';

let dir = '';
let server: Server;
let port = 0;

/** A raw HTTP request (no URL normalisation on the way, unlike fetch). */
function get(path: string, headers: Record<string, string> = {}, method = 'GET'): Promise<{ status: number; body: string; type?: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, path, method, headers: { host: `127.0.0.1:${port}`, ...headers } }, (res) => {
      let body = '';
      res.on('data', (c) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body, type: res.headers['content-type'] }));
    });
    req.on('error', reject);
    req.end();
  });
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'placode-view-'));
  mkdirSync(join(dir, 'app', 'assets'), { recursive: true });
  writeFileSync(join(dir, 'app', 'index.html'), '<!doctype html><title>app</title>');
  writeFileSync(join(dir, 'app', 'assets', 'a.js'), 'export {}');
  mkdirSync(join(dir, 'run', 'frames'), { recursive: true });
  writeFileSync(join(dir, 'run', 'record.json'), JSON.stringify({ status: 'end', scenarioText: 'x: 1', frames: [{ file: 'frames/0000.ply', time: 0, step: 0 }, { file: '../secret.txt', time: 1, step: 1 }] }));
  writeFileSync(join(dir, 'run', 'frames', '0000.ply'), 'ply\n');
  writeFileSync(join(dir, 'secret.txt'), 'not for the page');
  symlinkSync(join(dir, 'secret.txt'), join(dir, 'run', 'link.txt'));
  const started = await startViewServer({ appDir: join(dir, 'app'), runDir: join(dir, 'run'), port: 0 });
  server = started.server;
  port = started.port;
});
afterAll(() => {
  server?.close();
  rmSync(dir, { recursive: true, force: true });
});

describe('the viewer server', () => {
  it('binds to the loopback address only', () => {
    const address = server.address() as { address: string; family: string };
    expect(address.address).toBe('127.0.0.1');
  });

  it('serves the app, the run directory and its listing', async () => {
    const index = await get('/');
    expect(index.status).toBe(200);
    expect(index.type).toMatch(/text\/html/);
    expect((await get('/assets/a.js')).type).toMatch(/javascript/);
    const frame = await get('/run/frames/0000.ply');
    expect(frame.status).toBe(200);
    expect(frame.body).toBe('ply\n');
    const listing = JSON.parse((await get('/api/run')).body);
    expect(listing.run.name).toBe('run');
    expect(listing.run.frames).toEqual([{ file: 'frames/0000.ply', time: 0, step: 0 }]); // the frame pointing outside is dropped
    expect(listing.run.scenarioText).toBe('x: 1');
  });

  it('refuses every path outside the app and the run directory', async () => {
    for (const path of [
      '/../secret.txt', '/run/../../secret.txt', '/run/..%2f..%2fsecret.txt', '/%2e%2e/secret.txt', '/run/%2e%2e/%2e%2e/secret.txt',
      '/run/..%5c..%5csecret.txt', `/${encodeURIComponent(join(dir, 'secret.txt'))}`, '//etc/passwd', '/run//etc/passwd',
      '/run/link.txt', '/assets/%00a.js', '/C:/Windows/win.ini', '/%zz',
    ]) {
      const r = await get(path);
      expect([400, 403, 404], path).toContain(r.status);
      expect(r.body, path).not.toMatch(/not for the page|root:/);
    }
  });

  it('answers only GET and HEAD, and only to its own loopback host name', async () => {
    expect((await get('/', {}, 'POST')).status).toBe(405);
    expect((await get('/', {}, 'HEAD')).status).toBe(200);
    expect((await get('/', { host: 'evil.example:80' })).status).toBe(403);
    expect((await get('/', { host: `localhost:${port}` })).status).toBe(200);
  });

  it('insideRoot keeps paths in their root', () => {
    expect(insideRoot(dir, '/a/b.txt')).toBe(join(dir, 'a', 'b.txt'));
    expect(insideRoot(dir, '/a/../../b')).toBeUndefined();
    expect(insideRoot(dir, '/a/%2e%2e/%2e%2e/b')).toBeUndefined();
  });
});

describe('placode view as a real process', () => {
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    it(`exits within 1 s of the first ${signal}, its port closed, with a page connected`, async () => {
      const { spawn } = await import('node:child_process');
      const child = spawn(process.execPath, [fileURLToPath(new URL('../../solver/cli/placode.mjs', import.meta.url)), 'view', '--port', '0'], { stdio: ['ignore', 'pipe', 'pipe'] });
      // the line that names the address (the page may be built first)
      const url = await new Promise<string>((resolve, reject) => {
        let out = '';
        child.stdout.on('data', (c) => { out += c; const m = /Placode viewer at (http:\/\/127\.0\.0\.1:\d+\/)/.exec(out); if (m) resolve(m[1]); });
        child.on('exit', (code) => reject(new Error(`placode view exited (${code}) before serving`)));
      });
      const viewPort = Number(new URL(url).port);
      // a browser's open keep-alive connection must not hold the process
      const held = await new Promise<number>((resolve, reject) => {
        const req = request({ host: '127.0.0.1', port: viewPort, path: '/', headers: { connection: 'keep-alive' }, agent: new Agent({ keepAlive: true }) }, (res) => { res.resume(); resolve(res.statusCode ?? 0); });
        req.on('error', reject);
        req.end();
      });
      expect(held).toBe(200);
      const sent = performance.now();
      const exited = new Promise<number>((resolve) => child.on('exit', () => resolve(performance.now() - sent)));
      child.kill(signal);
      expect(await exited).toBeLessThan(1000);
      const refused = await new Promise<string>((resolve) => {
        const req = request({ host: '127.0.0.1', port: viewPort, path: '/' }, () => resolve('answered'));
        req.on('error', (e: NodeJS.ErrnoException) => resolve(e.code ?? 'error'));
        req.end();
      });
      expect(refused).toBe('ECONNREFUSED');
    }, 120_000);
  }
});

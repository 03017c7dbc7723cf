import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { createPatient, makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';

let t: TestApp;
let desk: Client;
let staticDir: string;
const bundle = `export const greeting = ${JSON.stringify('a bundle '.repeat(400))};\n`;

beforeAll(async () => {
  t = await makeTestApp();
  desk = (await signedIn(t, 'coordinator')).client;
  for (let i = 0; i < 30; i++) await createPatient(t.db, { lastName: `Squeezewell${i}` });
  // A built client as vite.config.ts writes it: each text asset also as .br and .gz.
  staticDir = fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-static-'));
  fs.mkdirSync(path.join(staticDir, 'assets'));
  const write = (rel: string, body: string) => {
    fs.writeFileSync(path.join(staticDir, rel), body);
    fs.writeFileSync(path.join(staticDir, `${rel}.br`), zlib.brotliCompressSync(body));
    fs.writeFileSync(path.join(staticDir, `${rel}.gz`), zlib.gzipSync(body));
  };
  write('index.html', `<!doctype html><title>Twinframe</title>${'<p>app</p>'.repeat(200)}`);
  write('assets/index-abc123.js', bundle);
});
afterAll(async () => {
  await t.close();
  fs.rmSync(staticDir, { recursive: true, force: true });
});

/** An answer's bytes as sent (supertest would decompress them), from a real socket. */
async function raw(app: http.RequestListener, url: string, headers: Record<string, string>) {
  const server = http.createServer(app).listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  try {
    const { port } = server.address() as AddressInfo;
    const res = await new Promise<http.IncomingMessage>((resolve, reject) => http.get({ host: '127.0.0.1', port, path: url, headers }, resolve).on('error', reject));
    const chunks: Buffer[] = [];
    for await (const c of res) chunks.push(c as Buffer);
    return { status: res.statusCode, headers: res.headers, body: Buffer.concat(chunks) };
  } finally {
    server.close();
  }
}

describe('HTTP compression', () => {
  it('sends JSON answers as brotli or gzip, as the browser accepts, and as they are otherwise', async () => {
    const url = '/api/patients?q=squeezewell&pageSize=30';
    const plain = await raw(t.app, url, { cookie: desk.cookie, 'accept-encoding': 'identity' });
    expect(plain.headers['content-encoding']).toBeUndefined();
    const json = plain.body.toString();
    expect(JSON.parse(json).items).toHaveLength(30);
    for (const [accept, encoding, decode] of [
      ['br, gzip', 'br', zlib.brotliDecompressSync],
      ['gzip', 'gzip', zlib.gunzipSync],
    ] as const) {
      const res = await raw(t.app, url, { cookie: desk.cookie, 'accept-encoding': accept });
      expect(res.headers['content-encoding']).toBe(encoding);
      expect(res.headers.vary).toMatch(/Accept-Encoding/i);
      expect(res.body.length).toBeLessThan(json.length / 3);
      expect(decode(res.body).toString()).toBe(json);
    }
  });

  it('serves built assets precompressed, with their Content-Encoding, Vary and caching', async () => {
    const app = createApp(t.deps, { staticDir });
    const br = await raw(app, '/assets/index-abc123.js', { 'accept-encoding': 'gzip, deflate, br' });
    expect(br.status).toBe(200);
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.headers['content-type']).toMatch(/javascript/);
    expect(br.headers.vary).toMatch(/Accept-Encoding/i);
    expect(br.headers['cache-control']).toContain('immutable');
    expect(zlib.brotliDecompressSync(br.body).toString()).toBe(bundle);
    expect(Number(br.headers['content-length'])).toBe(fs.statSync(path.join(staticDir, 'assets/index-abc123.js.br')).size);

    const gz = await raw(app, '/assets/index-abc123.js', { 'accept-encoding': 'gzip' });
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(gz.body).toString()).toBe(bundle);

    const none = await raw(app, '/assets/index-abc123.js', { 'accept-encoding': 'identity' });
    expect(none.headers['content-encoding']).toBeUndefined();
    expect(none.body.toString()).toBe(bundle);

    // Any screen's address gets the app's page, compressed too.
    const page = await raw(app, '/patients', { 'accept-encoding': 'br' });
    expect(page.headers['content-encoding']).toBe('br');
    expect(zlib.brotliDecompressSync(page.body).toString()).toContain('<title>Twinframe</title>');
  });
});

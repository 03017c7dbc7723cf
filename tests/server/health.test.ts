import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startS3Fake } from '../../server/dev-services.js';
import { queueMail } from '../../server/mail/outbox.js';
import { MailLog } from '../../server/entities/mail-log.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { startServer } from '../e2e/harness.js';
import request from 'supertest';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const ready = () => request(t.app).get('/api/health/ready');

describe('liveness and readiness', () => {
  it('is ready when the database, the object store and the mail queue answer', async () => {
    expect((await request(t.app).get('/api/health')).body).toEqual({ status: 'ok' });
    const res = await ready();
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('ready');
  });

  it('says not ready, naming the object store, while it is down; alive all the same', async () => {
    await t.s3.close();
    const res = await ready();
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('NOT_READY');
    expect(res.body.error.details.failing).toEqual(['object-store']);
    expect((await request(t.app).get('/api/health')).status).toBe(200);
    await t.restartS3();
    expect((await ready()).status).toBe(200);
  });

  it('says not ready, naming the mail queue, when a mail has waited too long', async () => {
    const row = await queueMail(t.db, { to: 'someone@mail.example', subject: 'Waiting', text: 'x' });
    await t.db.getRepository(MailLog).update({ id: row.id }, { createdAt: new Date(Date.now() - 60 * 60_000).toISOString() });
    const res = await ready();
    expect(res.status).toBe(503);
    expect(res.body.error.details.failing).toEqual(['mail-queue']);
    await t.db.getRepository(MailLog).update({ id: row.id }, { state: 'sent', sentAt: new Date().toISOString() });
    expect((await ready()).status).toBe(200);
  });
});

async function closedPort(): Promise<number> {
  const srv = net.createServer();
  await new Promise<void>((r) => srv.listen(0, '127.0.0.1', r));
  const { port } = srv.address() as net.AddressInfo;
  await new Promise((r) => srv.close(r));
  return port;
}

describe('start without the object store', () => {
  it('starts, answers, reports not ready, keeps retrying and becomes ready when the store comes up', { timeout: 240_000 }, async () => {
    const port = await closedPort();
    const app = await startServer({ S3_ENDPOINT: `http://127.0.0.1:${port}`, TWINFRAME_DEMO: '0' });
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tf-s3-late-'));
    let s3: Awaited<ReturnType<typeof startS3Fake>> | undefined;
    try {
      expect((await fetch(`${app.url}/api/health`)).status).toBe(200);
      const notReady = await fetch(`${app.url}/api/health/ready`);
      expect(notReady.status).toBe(503);
      expect((await notReady.json()).error.details.failing).toContain('object-store');
      s3 = await startS3Fake(dir, port, 'another-bucket');
      const deadline = Date.now() + 60_000;
      let status = 0;
      while (Date.now() < deadline && status !== 200) {
        await new Promise((r) => setTimeout(r, 1000));
        status = (await fetch(`${app.url}/api/health/ready`)).status;
      }
      expect(status, app.output()).toBe(200);
    } finally {
      await app.stop();
      await s3?.close();
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

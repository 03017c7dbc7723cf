import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readPoolFor } from '../../server/db/read-pool.js';
import { ACCESS_LOG_COUNT_CAP } from '../../server/features/access-log/access-log.schemas.js';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';

// A SQLite file, as the server has: the access log's reads run in the read pool's worker threads.
let t: TestApp;
let admin: Client;
const ROWS = 12_000;

beforeAll(async () => {
  t = await makeTestApp({}, {}, { sqliteFile: true });
  admin = (await signedIn(t, 'admin')).client;
  // Written in SQL (one statement), with runs of entries that share one instant, so the id must break the ties, and
  // a kilobyte of details each, so an export's batch is more than the sockets' buffers hold.
  await t.db.query(`WITH RECURSIVE n(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM n WHERE x < ${ROWS})
    INSERT INTO "audit_event" ("id", "at", "actorId", "actorRole", "action", "patientId", "targetType", "targetId", "ip", "userAgent", "details")
    SELECT lower(printf('%s-%s-%s-%s-%s', hex(randomblob(4)), hex(randomblob(2)), hex(randomblob(2)), hex(randomblob(2)), hex(randomblob(6)))),
      strftime('%Y-%m-%dT%H:%M:%fZ', '2025-01-01', '+' || (x / 3) || ' seconds'), NULL, 'admin', 'bulk.test', NULL, NULL, NULL, '10.0.0.1', 'bench', '{"note":"' || hex(zeroblob(500)) || '"}'
    FROM n`);
}, 120_000);
afterAll(() => t.close());

type Page = { items: { id: string; at: string }[]; total: number; totalIsAtLeast: boolean; older: string | null; newer: string | null };
const page = async (q: Record<string, string | number>) => {
  const res = await admin.get('/api/access-log').query(q);
  expect(res.status).toBe(200);
  return res.body as Page;
};

describe('access log at scale', () => {
  it('reads in worker threads of its own', () => {
    expect(readPoolFor(t.db).threaded).toBe(true);
  });

  it('walks the whole log by keyset, newest first, every entry exactly once, and says when the count is capped', async () => {
    const seen: { id: string; at: string }[] = [];
    let p = await page({ action: 'bulk.', pageSize: 200 });
    expect(p.total).toBe(ACCESS_LOG_COUNT_CAP);
    expect(p.totalIsAtLeast).toBe(true);
    for (;;) {
      seen.push(...p.items);
      if (!p.older) break;
      p = await page({ action: 'bulk.', pageSize: 200, before: p.older });
    }
    expect(seen).toHaveLength(ROWS);
    expect(new Set(seen.map((e) => e.id)).size).toBe(ROWS);
    const ordered = [...seen].sort((a, b) => (b.at === a.at ? b.id.localeCompare(a.id) : b.at.localeCompare(a.at)));
    expect(seen.map((e) => e.id)).toEqual(ordered.map((e) => e.id));
    expect(await page({ action: 'bulk.', to: '2024-12-31' })).toMatchObject({ items: [], total: 0, totalIsAtLeast: false, older: null, newer: null });
  }, 120_000);

  it('exports every matching entry as CSV, newest first', async () => {
    const res = await admin.get('/api/access-log.csv').query({ action: 'bulk.' });
    expect(res.status).toBe(200);
    const lines = res.text.trim().split('\r\n');
    expect(lines).toHaveLength(ROWS + 1);
    expect(lines[1] > lines[lines.length - 1]).toBe(true);
  }, 120_000);

  it('keeps answering while a long read runs', async () => {
    const reads = readPoolFor(t.db);
    let timerAt = 0;
    const t0 = performance.now();
    setTimeout(() => (timerAt = performance.now()), 5);
    await reads.rows(`WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c WHERE x < 5000000) SELECT count(*) AS n FROM c`, []);
    const doneAt = performance.now();
    expect(doneAt - t0).toBeGreaterThan(100);
    // On the server's own connection the timer could only fire after the query.
    expect(timerAt).toBeGreaterThan(0);
    expect(timerAt).toBeLessThan(doneAt - 50);
  });

  it('reads the next batch of an export only when the client has taken the last, and stops when it leaves', async () => {
    const server = http.createServer(t.app).listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const { port } = server.address() as AddressInfo;
    const reads = readPoolFor(t.db);
    const before = reads.started;
    const req = http.get({ port, host: '127.0.0.1', path: '/api/access-log.csv?action=bulk.', headers: { cookie: admin.cookie, 'accept-encoding': 'identity' } });
    const res = await new Promise<http.IncomingMessage>((r) => req.once('response', r));
    expect(res.statusCode).toBe(200);
    res.pause();
    // 12,000 rows are 3 batches of 5,000: a client that reads nothing holds the export at the first batch written
    // and the second read ahead; the third is never read.
    const deadline = Date.now() + 30_000;
    while (reads.started - before < 2 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
    await new Promise((r) => setTimeout(r, 2000));
    expect(reads.started - before).toBe(2);
    req.destroy();
    await new Promise((r) => setTimeout(r, 500));
    const afterLeaving = reads.started - before;
    await new Promise((r) => setTimeout(r, 1000));
    expect(reads.started - before).toBe(afterLeaving);
    server.close();
  }, 60_000);
});

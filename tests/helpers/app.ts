import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app.js';
import { hashPassword } from '../../server/auth/passwords.js';
import { loadConfig, type Config } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { closeReadPool } from '../../server/db/read-pool.js';
import type { Deps } from '../../server/deps.js';
import { Patient } from '../../server/entities/patient.js';
import { User, type Role } from '../../server/entities/user.js';
import { createLogger } from '../../server/logger.js';
import { startS3Fake, startSmtpFake, type RunningService } from '../../server/dev-services.js';
import { createMailer } from '../../server/mail/outbox.js';
import { createSmtpTransport } from '../../server/mail/transport.js';
import { createObjectStore } from '../../server/storage/object-store.js';
import { newId, nowIso } from '../../server/lib/time.js';

export const TEST_PASSWORD = 'correct-horse-battery';

export interface TestApp {
  app: ReturnType<typeof createApp>;
  db: DataSource;
  config: Config;
  deps: Deps;
  dataDir: string;
  s3: RunningService;
  /** Stops the S3 fake and starts it again on the same port and directory (for fault tests). */
  restartS3(): Promise<void>;
  /** The SMTP fake of this app; it writes each accepted message as an .eml file under `dataDir/mail`. */
  smtp: RunningService | null;
  stopSmtp(): Promise<void>;
  /** Starts the SMTP fake again on the same port and directory. */
  startSmtp(): Promise<void>;
  /** Every message the SMTP fake accepted so far, oldest first, parsed with mailparser. */
  mails(): Promise<ParsedMail[]>;
  close(): Promise<void>;
}

/**
 * A real app on a fresh in-memory SQLite database and a fresh bucket in its own S3 fake. With `sqliteFile` the
 * database is the file the server itself would use in `dataDir` (for tests that open it from outside the app, or
 * that need the read pool's worker threads).
 */
export async function makeTestApp(env: Record<string, string> = {}, extra: Partial<Deps> = {}, opts: { sqliteFile?: boolean } = {}): Promise<TestApp> {
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-test-'));
  const db = await openDatabase(opts.sqliteFile ? path.join(dataDir, 'twinframe.sqlite') : ':memory:');
  const objectsDir = path.join(dataDir, 'objects');
  let s3 = await startS3Fake(objectsDir, 0, 'twinframe-test');
  const mailDir = path.join(dataDir, 'mail');
  let smtp: RunningService | null = await startSmtpFake(mailDir, 0);
  const config = loadConfig({ TWINFRAME_DATA_DIR: dataDir, S3_BUCKET: 'twinframe-test', S3_FAKE_PORT: String(s3.port), SMTP_FAKE_PORT: String(smtp.port), ...env });
  const storage = createObjectStore(config.s3);
  await storage.ensureBucket();
  const logger = createLogger(process.env.TEST_LOG ?? 'silent');
  // Not started: tests drive the outbox with kick()/runOnce()/idle() so nothing polls behind their back.
  const mailer = createMailer({ db, storage, transport: createSmtpTransport(config.smtp), from: config.smtp.from, logger });
  const deps: Deps = { db, config, logger, storage, mailer, ...extra };
  const app = createApp(deps);
  const t: TestApp = {
    app,
    db,
    config,
    deps,
    dataDir,
    s3,
    async restartS3() {
      // A test may already have stopped it with `t.s3.close()` to simulate an outage.
      await t.s3.close().catch(() => undefined);
      s3 = await startS3Fake(objectsDir, config.s3.fakePort, 'twinframe-test');
      t.s3 = s3;
    },
    smtp,
    async stopSmtp() {
      await smtp?.close();
      smtp = null;
      t.smtp = null;
    },
    async startSmtp() {
      if (smtp) return;
      smtp = await startSmtpFake(mailDir, config.smtp.port);
      t.smtp = smtp;
    },
    async mails() {
      if (!fs.existsSync(mailDir)) return [];
      const files = fs.readdirSync(mailDir).filter((f) => f.endsWith('.eml')).sort();
      return Promise.all(files.map(async (f) => simpleParser(await fs.promises.readFile(path.join(mailDir, f)))));
    },
    async close() {
      await deps.mailer.stop();
      await smtp?.close();
      await closeReadPool(db);
      await db.destroy();
      await t.s3.close();
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
  return t;
}

export async function createUser(db: DataSource, role: Role, overrides: Partial<User> = {}): Promise<User> {
  const now = nowIso();
  const user = db.getRepository(User).create({
    id: newId(),
    email: `${role}-${newId().slice(0, 8)}@clinic.example`,
    name: `Test ${role}`,
    role,
    passwordHash: await hashPassword(TEST_PASSWORD),
    active: true,
    createdAt: now,
    updatedAt: now,
    ...overrides,
  });
  await db.getRepository(User).insert(user);
  return user;
}

export async function createPatient(db: DataSource, overrides: Partial<Patient> = {}): Promise<Patient> {
  const now = nowIso();
  const p = db.getRepository(Patient).create({
    id: newId(),
    code: `T-${newId().slice(0, 6)}`,
    firstName: 'Nadia',
    lastName: 'Testworth',
    dateOfBirth: '1990-01-01',
    email: 'nadia@mail.example',
    phone: null,
    archived: false,
    createdAt: now,
    updatedAt: now,
    ...overrides,
  });
  await db.getRepository(Patient).insert(p);
  return p;
}

/** A supertest agent with a cookie jar and the CSRF header set on every state-changing call. */
export class Client {
  readonly agent: ReturnType<typeof request.agent>;
  csrf = '';
  /** The session cookie as a `Cookie` header, for requests made without the agent (e.g. a raw socket). */
  cookie = '';
  constructor(app: TestApp['app']) {
    this.agent = request.agent(app);
  }
  private keepCookie(res: { headers: Record<string, unknown> }) {
    const set = (res.headers['set-cookie'] ?? []) as string[];
    for (const c of set) if (c.startsWith('tf.sid=')) this.cookie = c.split(';')[0];
  }
  async refreshCsrf(): Promise<string> {
    const res = await this.agent.get('/api/auth/csrf');
    this.keepCookie(res);
    this.csrf = res.body.token;
    return this.csrf;
  }
  async login(email: string, password = TEST_PASSWORD) {
    await this.refreshCsrf();
    const res = await this.agent.post('/api/auth/login').set('X-CSRF-Token', this.csrf).send({ email, password });
    this.keepCookie(res);
    await this.refreshCsrf();
    return res;
  }
  get(url: string) {
    return this.agent.get(url);
  }
  post(url: string) {
    return this.agent.post(url).set('X-CSRF-Token', this.csrf);
  }
  patch(url: string) {
    return this.agent.patch(url).set('X-CSRF-Token', this.csrf);
  }
  put(url: string) {
    return this.agent.put(url).set('X-CSRF-Token', this.csrf);
  }
  delete(url: string) {
    return this.agent.delete(url).set('X-CSRF-Token', this.csrf);
  }
}

/** Signs in a new user of the role and returns its client. */
export async function signedIn(t: TestApp, role: Role): Promise<{ client: Client; user: User }> {
  const user = await createUser(t.db, role);
  const client = new Client(t.app);
  const res = await client.login(user.email);
  if (res.status !== 200) throw new Error(`login failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { client, user };
}

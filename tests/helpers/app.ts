import request from 'supertest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app.js';
import { hashPassword } from '../../server/auth/passwords.js';
import { loadConfig, type Config } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import type { Deps } from '../../server/deps.js';
import { Patient } from '../../server/entities/patient.js';
import { User, type Role } from '../../server/entities/user.js';
import { createLogger } from '../../server/logger.js';
import { newId, nowIso } from '../../server/lib/time.js';

export const TEST_PASSWORD = 'correct-horse-battery';

export interface TestApp {
  app: ReturnType<typeof createApp>;
  db: DataSource;
  config: Config;
  deps: Deps;
  close(): Promise<void>;
}

/** A real app on a fresh in-memory SQLite database. */
export async function makeTestApp(env: Record<string, string> = {}, extra: Partial<Deps> = {}): Promise<TestApp> {
  const db = await openDatabase(':memory:');
  const config = loadConfig({ TWINFRAME_DATA_DIR: '/tmp/twinframe-test-unused', ...env });
  const deps: Deps = { db, config, logger: createLogger('silent'), ...extra };
  const app = createApp(deps);
  return { app, db, config, deps, close: () => db.destroy() };
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
  constructor(app: TestApp['app']) {
    this.agent = request.agent(app);
  }
  async refreshCsrf(): Promise<string> {
    const res = await this.agent.get('/api/auth/csrf');
    this.csrf = res.body.token;
    return this.csrf;
  }
  async login(email: string, password = TEST_PASSWORD) {
    await this.refreshCsrf();
    const res = await this.agent.post('/api/auth/login').set('X-CSRF-Token', this.csrf).send({ email, password });
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

import 'reflect-metadata';
import fs from 'node:fs';
import path from 'node:path';
import { createApp } from './app.js';
import { loadConfig } from './config.js';
import { openDatabase } from './db/data-source.js';
import { DEMO_USERS, seedDemo } from './db/seed.js';
import { seedDemoConsents } from './db/seed-consents.js';
import { seedDemoPhotos } from './db/seed-photos.js';
import { startS3Fake, startSmtpFake, type RunningService } from './dev-services.js';
import { createLogger } from './logger.js';
import { closeReadPool } from './db/read-pool.js';
import { createReminderScheduler } from './features/reminders/scheduler.js';
import { createDigestScheduler } from './features/integrity/digest.js';
import { createMailer } from './mail/outbox.js';
import { createSmtpTransport } from './mail/transport.js';
import { createObjectStore } from './storage/object-store.js';
import { resumeErasures } from './features/patient-data/erasure.js';
import { untilReady } from './storage/until-ready.js';
import { signingIdentity } from './signing/pdf-signing.js';

const config = loadConfig();
const logger = createLogger(config.logLevel);
fs.mkdirSync(config.dataDir, { recursive: true });

const services: RunningService[] = [];
if (config.startFakes) {
  services.push(await startS3Fake(path.join(config.dataDir, 'objects'), config.s3.fakePort, config.s3.bucket));
  services.push(await startSmtpFake(path.join(config.dataDir, 'mail'), config.smtp.fakePort));
}

const storage = createObjectStore(config.s3);
// The server starts even when the object store cannot be reached: it keeps trying, /api/health/ready says not ready.
const bucket = untilReady('object storage', () => storage.ensureBucket(), logger);

const db = await openDatabase(path.join(config.dataDir, 'twinframe.sqlite'));
const seeded = config.demo ? await seedDemo(db) : false;
// An erasure a crash left half-done is completed once storage answers.
void bucket.ready.then(() => resumeErasures({ db, storage, logger })).catch((err: unknown) => logger.error({ err }, 'an unfinished erasure could not be completed yet'));
// Created (or read) now, so the first signature does not wait for a key to be generated.
const identity = await signingIdentity(db, config);

const mailer = createMailer({ db, storage, transport: createSmtpTransport(config.smtp), from: config.smtp.from, logger });
mailer.start();
// Started here, not in createApp, so tests drive reminders themselves with runOnce().
const reminders = createReminderScheduler({ db, config, logger, mailer });
reminders.start();
const digests = createDigestScheduler({ db, config, logger, mailer });
digests.start();

const app = createApp({ db, config, logger, storage, mailer }, { staticDir: path.resolve('dist') });
const server = app.listen(config.port, () => {
  const url = `http://localhost:${config.port}`;
  const lines = [
    `Twinframe is running at ${url}`,
    `Data: ${config.dataDir}${seeded ? ' (demo clinic seeded)' : ''}`,
    `PDF signing certificate (${identity.source}): ${identity.commonName}, SHA-256 ${identity.fingerprint}`,
  ];
  if (config.demo) {
    lines.push('Demo sign-ins:');
    for (const u of DEMO_USERS) lines.push(`  ${u.role.padEnd(13)} ${u.email.padEnd(28)} ${u.password}`);
  }
  console.log(lines.join('\n'));
  if (config.demoPhotos) {
    // In the background, so the app answers at once; forms are signed and portraits stored through the real code.
    const started = Date.now();
    const seconds = () => Math.round((Date.now() - started) / 1000);
    bucket.ready
      .then(() => seedDemoConsents({ db, config, logger, storage, mailer }, { stopped: () => stopping }))
      .then((n) => n && console.log(`Demo consents: ${n} forms signed in ${seconds()} s`))
      .catch((err: unknown) => stopping || logger.error({ err }, 'demo consents could not be seeded'))
      .then(() => seedDemoPhotos({ db, storage, logger, config }, { stopped: () => stopping }))
      .then((n) => n && console.log(`Demo photos: ${n} invented portraits stored in ${seconds()} s`))
      .catch((err: unknown) => stopping || logger.error({ err }, 'demo photos could not be seeded'));
  }
});

let stopping = false;
async function shutdown() {
  if (stopping) return;
  stopping = true;
  server.close();
  bucket.stop();
  await reminders.stop();
  await digests.stop();
  await mailer.stop();
  await Promise.allSettled(services.map((s) => s.close()));
  await closeReadPool(db);
  await db.destroy();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);

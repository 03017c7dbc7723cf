/**
 * One reminder pass in its own process, as another app instance would run it: `tsx reminder-pass.ts <db> <iso-now>`.
 * Prints how many reminders this process queued.
 */
import 'reflect-metadata';
import { loadConfig } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { createReminderScheduler } from '../../server/features/reminders/scheduler.js';
import { createLogger } from '../../server/logger.js';

const [dbFile, at, startAt] = process.argv.slice(2);
const db = await openDatabase(dbFile);
const scheduler = createReminderScheduler({ db, config: loadConfig({}), logger: createLogger('silent'), mailer: { kick() {} } });
// All processes wait for the same wall-clock moment so their passes overlap.
await new Promise((r) => setTimeout(r, Math.max(0, Number(startAt) - Date.now())));
const queued = await scheduler.runOnce(new Date(at));
await db.destroy();
process.stdout.write(String(queued));

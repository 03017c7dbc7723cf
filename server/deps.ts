import type { Logger } from 'pino';
import type { DataSource } from 'typeorm';
import type { Config } from './config.js';
import type { Mailer } from './mail/outbox.js';
import type { ObjectStore } from './storage/object-store.js';

/** Everything the app needs from outside; tests build their own. */
export interface Deps {
  db: DataSource;
  config: Config;
  logger: Logger;
  storage: ObjectStore;
  /** The outbox worker; queue mails with `queueMail` inside a transaction, then `mailer.kick()`. */
  mailer: Mailer;
}

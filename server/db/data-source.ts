import 'reflect-metadata';
import path from 'node:path';
import { DataSource } from 'typeorm';
import { AuditEvent } from '../entities/audit-event.js';
import { ClinicSettings } from '../entities/clinic-settings.js';
import { ComplicationAction, ComplicationEpisode, ComplicationFollowUp } from '../entities/complication.js';
import { ShowcaseExport, ShowcaseRequest } from '../entities/showcase.js';
import { ConsentEvidence } from '../entities/consent-evidence.js';
import { ConsentRecord } from '../entities/consent-record.js';
import { ConsentTemplate } from '../entities/consent-template.js';
import { HandoverSession } from '../entities/handover-session.js';
import { LoginFailure } from '../entities/login-failure.js';
import { MailLog } from '../entities/mail-log.js';
import { Patient } from '../entities/patient.js';
import { Photo } from '../entities/photo.js';
import { Product } from '../entities/product.js';
import { Consultation } from '../entities/consultation.js';
import { ReferencePicture } from '../entities/reference-picture.js';
import { Reminder } from '../entities/reminder.js';
import { Treatment, TreatmentDose, TreatmentLine } from '../entities/treatment.js';
import { Session } from '../entities/session.js';
import { StockLot, StockMovement } from '../entities/stock.js';
import { ShotList, ShotListView } from '../entities/shot-list.js';
import { User } from '../entities/user.js';
import { Visit } from '../entities/visit.js';
import { SigningIdentityRow } from '../entities/signing-identity.js';
import { RateLimitHit } from '../entities/rate-limit.js';
import { RateLimit1766012000002 } from './migrations/1766012000002-rate-limit.js';
import { ChainDigest, ChainHead, ChainTombstone } from '../entities/record-chain.js';
import { ChainSubscriber } from '../features/integrity/chain.js';
import { RecordChains1766012000001 } from './migrations/1766012000001-record-chains.js';
import { SigningIdentity1766012000000 } from './migrations/1766012000000-signing-identity.js';
import { AccessLogKeyset1766020000001 } from './migrations/1766020000001-access-log-keyset.js';
import { PatientSearch1766020000000 } from './migrations/1766020000000-patient-search.js';
import { Showcase1765300000000 } from './migrations/1765300000000-showcase.js';
import { Erasure1765200000000 } from './migrations/1765200000000-erasure.js';
import { Settings1765100000000 } from './migrations/1765100000000-settings.js';
import { Foundation1764600000000 } from './migrations/1764600000000-foundation.js';
import { Photos1764700000000 } from './migrations/1764700000000-photos.js';
import { Landmarks1764800000000 } from './migrations/1764800000000-landmarks.js';
import { Consents1764900000000 } from './migrations/1764900000000-consents.js';
import { Treatments1765000000000 } from './migrations/1765000000000-treatments.js';
import { ProductCatalogue1766014000000 } from './migrations/1766014000000-product-catalogue.js';
import { Stock1766014000001 } from './migrations/1766014000001-stock.js';
import { Complications1766014000002 } from './migrations/1766014000002-complications.js';
import { TraceabilitySettings1766014000003 } from './migrations/1766014000003-traceability-settings.js';
import { ConsentOncePerHandover1764900000001 } from './migrations/1764900000001-consent-once-per-handover.js';
import { ErasureJournal1766019000000 } from './migrations/1766019000000-erasure-journal.js';
import { Sessions1766019000001 } from './migrations/1766019000001-sessions.js';

export const ENTITIES = [User, Patient, Visit, AuditEvent, Session, LoginFailure, ShotList, ShotListView, Photo, MailLog, ConsentTemplate, HandoverSession, ConsentRecord, ConsentEvidence, Product, Consultation, Treatment, TreatmentLine, TreatmentDose, Reminder, ReferencePicture, ClinicSettings, ShowcaseRequest, ShowcaseExport, StockLot, StockMovement, ComplicationEpisode, ComplicationAction, ComplicationFollowUp, SigningIdentityRow, ChainHead, ChainTombstone, ChainDigest, RateLimitHit];

/** Listed explicitly (not globbed) so the same list works under tsx, vitest and a build. */
export const MIGRATIONS = [Foundation1764600000000, Photos1764700000000, Landmarks1764800000000, Consents1764900000000, ConsentOncePerHandover1764900000001, Treatments1765000000000, Settings1765100000000, Erasure1765200000000, Showcase1765300000000, SigningIdentity1766012000000, RecordChains1766012000001, RateLimit1766012000002, ProductCatalogue1766014000000, Stock1766014000001, Complications1766014000002, TraceabilitySettings1766014000003, ErasureJournal1766019000000, Sessions1766019000001, PatientSearch1766020000000, AccessLogKeyset1766020000001];

/**
 * Builds the SQLite data source. `database` is a file path, or ":memory:" in tests.
 */
export function createDataSource(database: string): DataSource {
  return serialiseTransactions(new DataSource({
    type: 'better-sqlite3',
    database,
    entities: ENTITIES,
    // Chains consent records, their evidence and the access log on every insert.
    subscribers: [ChainSubscriber],
    migrations: MIGRATIONS,
    migrationsRun: false,
    synchronize: false,
    logging: false,
    prepareDatabase: (db: { pragma: (s: string) => unknown }) => {
      db.pragma('journal_mode = WAL');
      db.pragma('foreign_keys = ON');
      db.pragma('busy_timeout = 5000');
    },
  }));
}

/**
 * SQLite through TypeORM is one connection: two transactions begun in the same tick collide
 * ("cannot start a transaction within a transaction"). Queue them, one after the other, per data source.
 * Code inside a transaction must use its `tx` manager, never start another one on the data source.
 */
function serialiseTransactions(ds: DataSource): DataSource {
  const manager = ds.manager;
  const begin = manager.transaction.bind(manager) as (...args: unknown[]) => Promise<unknown>;
  let tail: Promise<unknown> = Promise.resolve();
  manager.transaction = ((...args: unknown[]) => {
    const run = tail.then(() => begin(...args));
    tail = run.catch(() => undefined);
    return run;
  }) as typeof manager.transaction;
  return ds;
}

/** Opens the database and brings its schema up to date. */
export async function openDatabase(database: string): Promise<DataSource> {
  const ds = createDataSource(database);
  await ds.initialize();
  await ds.runMigrations({ transaction: 'each' });
  return ds;
}

/** Used by the TypeORM CLI (`migration:generate`). */
export default createDataSource(process.env.TWINFRAME_DB ?? path.resolve('storage', 'twinframe.sqlite'));

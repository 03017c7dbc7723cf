import path from 'node:path';

/** Runtime configuration, read once from the environment. */
export interface Config {
  port: number;
  dataDir: string;
  demo: boolean;
  /** Draw invented portraits for the demo patients' past visits (in the background after start). */
  demoPhotos: boolean;
  /** Start the local S3 and SMTP fakes inside this process. */
  startFakes: boolean;
  sessionSecret: string;
  idleMinutes: number;
  /** Absolute session lifetime (hours), the default of the clinic setting. */
  sessionHours: number;
  secureCookies: boolean;
  /** Express "trust proxy": false, a hop count, or addresses/subnets of the reverse proxies (TRUST_PROXY). */
  trustProxy: boolean | number | string;
  clinicName: string;
  clinicTimeZone: string;
  /** Prefix of the short patient codes, e.g. "LR" gives LR-0001. */
  patientCodePrefix: string;
  s3: {
    endpoint: string;
    region: string;
    bucket: string;
    accessKeyId: string;
    secretAccessKey: string;
    fakePort: number;
  };
  smtp: { host: string; port: number; from: string; fakePort: number; secure: boolean; user?: string; pass?: string };
  /** How long a hand-over stays open before the device must go back to staff. */
  handoverMinutes: number;
  /** Treatment record and reminder settings. */
  treatments: TreatmentSettings;
  /** The address patients and outsiders reach the clinic's app at; printed on signed PDFs (the verify page). */
  publicUrl: string;
  /** PDF signing: a PKCS#12 file from an authority, or (when null) a key and certificate created at first start. */
  signing: { p12File: string | null; passphrase: string };
  /** The public verify page: checks allowed per address in each window. */
  verify: { limit: number; windowMinutes: number };
  /** Hour of the day (clinic time) from which the daily e-mail of the record chain heads goes to the admins. */
  digestHour: number;
  logLevel: string;
}

/**
 * Defaults: review 14 days after treatment (clinics review at 2–4 weeks), maintenance 6 months (HA lip filler
 * typically lasts about 6–9 months), a session above 2 mL of filler warns (FACTS 17, common practice).
 */
export interface TreatmentSettings {
  /** Days from treatment to the review reminder, 14–28. */
  reviewDays: number;
  /** Months from treatment to the maintenance reminder, 3–12. */
  maintenanceMonths: number;
  /** A session's filler total above this many mL warns. */
  highVolumeMl: number;
  /** A lot expiring within this many days of use warns. */
  lotWarnDays: number;
  /** Wall-clock hour (clinic time zone) from which a reminder due that day is sent. */
  reminderHour: number;
}

const clamp = (n: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, n));

function int(value: string | undefined, fallback: number): number {
  const n = value === undefined || value === '' ? NaN : Number(value);
  return Number.isInteger(n) ? n : fallback;
}

function positive(value: string | undefined, fallback: number): number {
  const n = Number(value);
  return value && Number.isFinite(n) && n > 0 ? n : fallback;
}

/** `TRUST_PROXY`: unset or 0 → trust none; a number → that many hops; anything else → Express's address list. */
function trustProxy(value: string | undefined): boolean | number | string {
  if (!value || value === '0' || value === 'false') return false;
  return /^\d+$/.test(value) ? Number(value) : value;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const dataDir = path.resolve(env.TWINFRAME_DATA_DIR ?? 'storage');
  const s3FakePort = int(env.S3_FAKE_PORT, 4569);
  const smtpFakePort = int(env.SMTP_FAKE_PORT, 2525);
  const externalS3 = Boolean(env.S3_ENDPOINT);
  return {
    port: int(env.PORT, 8080),
    dataDir,
    demo: env.TWINFRAME_DEMO !== '0',
    demoPhotos: env.TWINFRAME_DEMO !== '0' && env.TWINFRAME_DEMO_PHOTOS !== '0',
    startFakes: !externalS3 && env.TWINFRAME_FAKES !== '0',
    sessionSecret: env.SESSION_SECRET ?? 'twinframe-local-development-secret-change-me',
    idleMinutes: positive(env.TWINFRAME_IDLE_MINUTES, 15),
    sessionHours: clamp(int(env.TWINFRAME_SESSION_HOURS, 12), 1, 24),
    secureCookies: env.COOKIE_SECURE === '1',
    trustProxy: trustProxy(env.TRUST_PROXY),
    clinicName: env.TWINFRAME_CLINIC_NAME ?? 'Linden Row Aesthetics',
    clinicTimeZone: env.TWINFRAME_TIME_ZONE ?? 'Europe/London',
    patientCodePrefix: env.TWINFRAME_CODE_PREFIX ?? 'LR',
    s3: {
      endpoint: env.S3_ENDPOINT ?? `http://127.0.0.1:${s3FakePort}`,
      region: env.S3_REGION ?? 'us-east-1',
      bucket: env.S3_BUCKET ?? 'twinframe',
      accessKeyId: env.S3_ACCESS_KEY_ID ?? 'S3RVER',
      secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? 'S3RVER',
      fakePort: s3FakePort,
    },
    smtp: {
      host: env.SMTP_HOST ?? '127.0.0.1',
      port: int(env.SMTP_PORT, smtpFakePort),
      from: env.MAIL_FROM ?? 'Twinframe <no-reply@twinframe.invalid>',
      fakePort: smtpFakePort,
      secure: env.SMTP_SECURE === '1',
      user: env.SMTP_USER || undefined,
      pass: env.SMTP_PASS || undefined,
    },
    handoverMinutes: int(env.TWINFRAME_HANDOVER_MINUTES, 30),
    treatments: {
      reviewDays: clamp(int(env.TWINFRAME_REVIEW_DAYS, 14), 14, 28),
      maintenanceMonths: clamp(int(env.TWINFRAME_MAINTENANCE_MONTHS, 6), 3, 12),
      highVolumeMl: positive(env.TWINFRAME_HIGH_VOLUME_ML, 2),
      lotWarnDays: clamp(int(env.TWINFRAME_LOT_WARN_DAYS, 30), 0, 365),
      reminderHour: clamp(int(env.TWINFRAME_REMINDER_HOUR, 9), 0, 23),
    },
    publicUrl: (env.TWINFRAME_PUBLIC_URL || `http://localhost:${int(env.PORT, 8080)}`).replace(/\/+$/, ''),
    signing: {
      p12File: env.TWINFRAME_SIGNING_P12 ? path.resolve(env.TWINFRAME_SIGNING_P12) : null,
      passphrase: env.TWINFRAME_SIGNING_PASSPHRASE ?? 'twinframe-local-development-signing-passphrase',
    },
    verify: { limit: clamp(int(env.TWINFRAME_VERIFY_LIMIT, 20), 1, 10_000), windowMinutes: 15 },
    digestHour: clamp(int(env.TWINFRAME_DIGEST_HOUR, 7), 0, 23),
    logLevel: env.LOG_LEVEL ?? 'info',
  };
}

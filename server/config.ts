import path from 'node:path';

/** Runtime configuration, read once from the environment. */
export interface Config {
  port: number;
  dataDir: string;
  demo: boolean;
  /** Start the local S3 and SMTP fakes inside this process. */
  startFakes: boolean;
  sessionSecret: string;
  idleMinutes: number;
  secureCookies: boolean;
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
  logLevel: string;
}

function int(value: string | undefined, fallback: number): number {
  const n = value === undefined || value === '' ? NaN : Number(value);
  return Number.isInteger(n) ? n : fallback;
}

function positive(value: string | undefined, fallback: number): number {
  const n = Number(value);
  return value && Number.isFinite(n) && n > 0 ? n : fallback;
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
    startFakes: !externalS3 && env.TWINFRAME_FAKES !== '0',
    sessionSecret: env.SESSION_SECRET ?? 'twinframe-local-development-secret-change-me',
    idleMinutes: positive(env.TWINFRAME_IDLE_MINUTES, 15),
    secureCookies: env.COOKIE_SECURE === '1',
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
    logLevel: env.LOG_LEVEL ?? 'info',
  };
}

import pino, { type Logger } from 'pino';

export const createLogger = (level: string): Logger =>
  pino({ level, redact: { paths: ['req.headers.cookie', 'req.headers.authorization', 'req.headers["x-csrf-token"]', 'password', '*.password'], remove: true } });

import fs from 'node:fs';
import path from 'node:path';
import S3rver from 's3rver';
import { SMTPServer } from 'smtp-server';
import { newId } from './lib/time.js';

export interface RunningService {
  port: number;
  close(): Promise<void>;
}

/** The local S3-compatible fake: objects live as files under `dir`. Only for demo, development and tests. */
export async function startS3Fake(dir: string, port: number, bucket: string): Promise<RunningService> {
  fs.mkdirSync(dir, { recursive: true });
  const server = new S3rver({ port, address: '127.0.0.1', directory: dir, silent: true, configureBuckets: [{ name: bucket, configs: [] }] });
  const { port: actual } = (await server.run()) as { port: number };
  return { port: actual, close: () => server.close() };
}

/** The local SMTP fake: each accepted message is written to `dir` as an .eml file. */
export async function startSmtpFake(dir: string, port: number): Promise<RunningService> {
  fs.mkdirSync(dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        const name = `${new Date().toISOString().replace(/[:.]/g, '-')}-${newId()}.eml`;
        fs.promises.writeFile(path.join(dir, name), Buffer.concat(chunks)).then(() => callback(), callback);
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const actual = typeof address === 'object' && address ? address.port : port;
  return { port: actual, close: () => new Promise((resolve) => server.close(() => resolve())) };
}

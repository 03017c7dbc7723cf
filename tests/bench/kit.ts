/** Small shared parts of the benchmarks: statistics, free ports, and the real server started as its own process. */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';

export const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

/** Nearest-rank percentile (the value below which `p` % of the samples fall). */
export const percentile = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.max(0, Math.ceil((p / 100) * s.length) - 1)];
};

export const mark = (ok: boolean) => (ok ? 'met' : 'NOT met');

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

/** The machine's state, printed with every set of figures: the machine is shared and its load moves them. */
export function machineLine(): string {
  return `${os.availableParallelism()} CPUs, load average ${os.loadavg().map((x) => x.toFixed(2)).join(' ')}, Node ${process.version}`;
}

export interface RunningServer {
  url: string;
  pid: number;
  /** Peak resident memory of the server process so far (VmHWM), in MB. */
  peakRssMb(): number;
  /** Current resident memory (VmRSS), in MB. */
  rssMb(): number;
  /** Why the server stopped, with the end of its error output, when it has stopped on its own; else null. */
  died(): string | null;
  stop(): Promise<void>;
}

function procStatusMb(pid: number, field: 'VmHWM' | 'VmRSS'): number {
  if (!fs.existsSync(`/proc/${pid}/status`)) return NaN;
  const m = new RegExp(`${field}:\\s+(\\d+) kB`).exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
  return m ? Number(m[1]) / 1024 : NaN;
}

/**
 * Starts the real server (`server/index.ts`, as `npm start` runs it after the build) in its own process with `env`,
 * and resolves once it listens. Its output is kept out of the benchmark's, except errors.
 */
export async function startServer(env: Record<string, string>): Promise<RunningServer> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  let err = '';
  child.stderr.on('data', (c: Buffer) => (err = (err + c.toString()).slice(-4000)));
  const url = await new Promise<string>((resolve, reject) => {
    let out = '';
    const onData = (c: Buffer) => {
      out += c.toString();
      const m = /Twinframe is running at (\S+)/.exec(out);
      if (m) resolve(m[1]);
      if (out.length > 100_000) out = out.slice(-10_000);
    };
    child.stdout.on('data', onData);
    child.once('exit', (code) => reject(new Error(`the server exited with ${code} before listening:\n${err}`)));
  });
  // Keep reading (and dropping) the request log so the pipe never fills.
  child.stdout.resume();
  const pid = child.pid!;
  let exit: string | null = null;
  child.once('exit', (code, signal) => (exit = `exit code ${code}, signal ${signal}`));
  return {
    url,
    pid,
    died: () => (exit ? `${exit}\n${err}` : null),
    peakRssMb: () => procStatusMb(pid, 'VmHWM'),
    rssMb: () => procStatusMb(pid, 'VmRSS'),
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}

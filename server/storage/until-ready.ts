import type { Logger } from 'pino';

/**
 * Retries `attempt` until it succeeds (every `everyMs`, logging each failure once a minute at most), so the server
 * starts and answers even while the object store or another part is unreachable, and reports not ready meanwhile.
 * Resolves when the attempt first succeeds; `stop()` gives up (at shutdown).
 */
export function untilReady(what: string, attempt: () => Promise<void>, logger: Logger, everyMs = 5_000): { ready: Promise<void>; stop(): void } {
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  let lastLog = 0;
  const ready = new Promise<void>((resolve) => {
    const tryOnce = () => {
      attempt().then(
        () => {
          if (lastLog) logger.info(`${what} is reachable again`);
          resolve();
        },
        (err: unknown) => {
          if (Date.now() - lastLog > 60_000) {
            logger.warn({ err: (err as Error).message }, `${what} is not reachable; retrying every ${everyMs / 1000} s`);
            lastLog = Date.now();
          }
          if (!stopped) timer = setTimeout(tryOnce, everyMs);
        },
      );
    };
    tryOnce();
  });
  return {
    ready,
    stop() {
      stopped = true;
      clearTimeout(timer);
    },
  };
}

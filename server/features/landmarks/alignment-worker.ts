/**
 * Runs alignment after upload without holding up the upload's answer. One worker per database; jobs run one at a
 * time (the face model and libvips already use the cores). Nothing lives only in memory: a photo waiting here is
 * "aligning" in the database, and `resume()` finds every such photo again after a restart.
 */
import type { DataSource } from 'typeorm';
import { Photo } from '../../entities/photo.js';
import type { PipelineDeps } from '../../media/after-store.js';
import { alignStoredPhoto } from './alignment.service.js';

/** Runs after which a photo that keeps failing (e.g. storage down) is handed to the practitioner. */
export const MAX_ATTEMPTS = 3;
const RETRY_MS = 2_000;

interface Pending {
  promise: Promise<void>;
  resolve: () => void;
}

export class AlignmentWorker {
  private queue: string[] = [];
  private pending = new Map<string, Pending>();
  /** Display bytes handed over at upload, so the first run need not read them back from storage. */
  private bytes = new Map<string, Buffer>();
  private running: Promise<void> | null = null;
  private timers = new Set<NodeJS.Timeout>();
  private stopped = false;

  constructor(private readonly deps: PipelineDeps) {}

  /**
   * Queues a photo; resolves when a run that started after this call has finished (successfully or not). `urgent`
   * puts it first: someone is waiting on the screen, not just a backlog after a restart.
   */
  enqueue(photoId: string, displayBytes?: Buffer, opts: { urgent?: boolean } = {}): Promise<void> {
    if (displayBytes) this.bytes.set(photoId, displayBytes);
    let p = this.pending.get(photoId);
    if (!p) {
      let resolve!: () => void;
      const promise = new Promise<void>((r) => (resolve = r));
      p = { promise, resolve };
      this.pending.set(photoId, p);
      this.queue.push(photoId);
    }
    if (opts.urgent) this.queue = [photoId, ...this.queue.filter((id) => id !== photoId)];
    this.kick();
    return p.promise;
  }

  /** Queues every photo the database still marks as aligning (after a restart, or rows written by the seed). */
  async resume(): Promise<void> {
    if (!this.deps.db.isInitialized) return;
    const rows = await this.deps.db.getRepository(Photo).find({ where: { alignmentState: 'aligning' }, select: { id: true }, order: { uploadedAt: 'ASC' } });
    for (const r of rows) void this.enqueue(r.id);
  }

  /** Resolves when the queue is empty and nothing runs (tests wait on this). */
  async idle(): Promise<void> {
    while (this.running || this.queue.length || this.timers.size) {
      if (this.running) await this.running;
      else await new Promise((r) => setTimeout(r, 25));
    }
  }

  stop(): void {
    this.stopped = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
  }

  private kick(): void {
    if (this.running || this.stopped) return;
    this.running = this.loop().finally(() => {
      this.running = null;
      if (this.queue.length && !this.stopped) this.kick();
    });
  }

  private async loop(): Promise<void> {
    while (this.queue.length && !this.stopped) {
      const id = this.queue.shift()!;
      const job = this.pending.get(id)!;
      this.pending.delete(id);
      const bytes = this.bytes.get(id);
      this.bytes.delete(id);
      try {
        if (!this.deps.db.isInitialized) continue;
        for (const next of await alignStoredPhoto(this.deps, id, bytes)) void this.enqueue(next);
      } catch (err) {
        await this.failed(id, err);
      } finally {
        job.resolve();
      }
    }
  }

  private async failed(id: string, err: unknown): Promise<void> {
    const { db, logger } = this.deps;
    if (!db.isInitialized) return;
    logger.warn({ err, photoId: id }, 'aligning a photo failed');
    try {
      const repo = db.getRepository(Photo);
      const photo = await repo.findOneBy({ id });
      if (!photo || photo.alignmentState !== 'aligning') return;
      const attempts = photo.alignmentAttempts + 1;
      if (attempts >= MAX_ATTEMPTS) {
        await repo.update(
          { id, landmarksRev: photo.landmarksRev },
          {
            alignmentState: 'needs-landmarks',
            alignmentAttempts: attempts,
            alignmentNote: 'Alignment could not be completed. Check the landmarks and save them, or reset to automatic, to try again.',
          },
        );
        return;
      }
      await repo.update({ id }, { alignmentAttempts: attempts });
      const t = setTimeout(() => {
        this.timers.delete(t);
        if (!this.stopped && db.isInitialized) void this.enqueue(id);
      }, RETRY_MS * attempts);
      t.unref();
      this.timers.add(t);
    } catch (e) {
      logger.warn({ err: e, photoId: id }, 'could not record a failed alignment');
    }
  }
}

const workers = new WeakMap<DataSource, AlignmentWorker>();

/** The alignment worker of a database (one per app; tests get their own with their own database). */
export function alignmentWorkerFor(deps: PipelineDeps): AlignmentWorker {
  let w = workers.get(deps.db);
  if (!w) {
    w = new AlignmentWorker(deps);
    workers.set(deps.db, w);
  }
  return w;
}

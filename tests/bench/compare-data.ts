/**
 * Grows one patient's record through the real API (upload → ingest pipeline → automatic landmarks and alignment),
 * for the compare benchmark and for looking at the compare screens with a long history.
 *
 * Photos are the invented demo portraits (no real person), enlarged to a camera-like size with sensor-like noise, so
 * the display and aligned variants weigh what a real photo's would, not what a flat drawing's would.
 */
import sharp from 'sharp';
import { PORTRAIT_VIEWS, renderPortrait, type PortraitView } from '../../server/media/synthetic-portrait.js';

/** A signed-in API session over plain fetch (cookie jar of one cookie, CSRF header on writes). */
export class ApiSession {
  private cookie = '';
  private csrf = '';
  constructor(readonly baseUrl: string) {}
  private async refreshCsrf() {
    const res = await fetch(`${this.baseUrl}/api/auth/csrf`, { headers: { cookie: this.cookie } });
    this.keepCookie(res);
    this.csrf = ((await res.json()) as { token: string }).token;
  }
  private keepCookie(res: Response) {
    const set = res.headers.getSetCookie?.() ?? [];
    for (const c of set) if (c.startsWith('tf.sid=')) this.cookie = c.split(';')[0];
  }
  async signIn(email: string, password: string) {
    await this.refreshCsrf();
    const res = await this.call('POST', '/api/auth/login', { email, password });
    await this.refreshCsrf();
    return res as { id: string; name: string };
  }
  async call<T = unknown>(method: string, path: string, body?: unknown): Promise<T> {
    const res = await fetch(`${this.baseUrl}${path}`, {
      method,
      headers: { cookie: this.cookie, 'x-csrf-token': this.csrf, ...(body !== undefined ? { 'content-type': 'application/json' } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    this.keepCookie(res);
    if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`);
    return (res.status === 204 ? undefined : await res.json()) as T;
  }
  /** The raw answer, for streamed downloads. */
  async raw(method: string, path: string, signal?: AbortSignal): Promise<Response> {
    const res = await fetch(`${this.baseUrl}${path}`, { method, headers: { cookie: this.cookie, 'x-csrf-token': this.csrf }, signal });
    if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`);
    return res;
  }
  async upload(visitId: string, view: string, jpeg: Buffer): Promise<{ id: string }> {
    const form = new FormData();
    form.set('view', view);
    form.set('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'photo.jpg');
    const res = await fetch(`${this.baseUrl}/api/visits/${visitId}/photos`, { method: 'POST', headers: { cookie: this.cookie, 'x-csrf-token': this.csrf }, body: form });
    if (res.status !== 201 && res.status !== 200) throw new Error(`upload ${view}: ${res.status} ${await res.text()}`);
    return (await res.json()) as { id: string };
  }
}

/** A portrait at `scale` × its drawn size, with gaussian sensor noise (σ = 4), as a quality-90 JPEG. */
export async function cameraLikePortrait(view: PortraitView, seed: number, lipVolume: number, shot: number, scale: number): Promise<Buffer> {
  const drawn = await renderPortrait({ seed, view, lipVolume, shot }, { quality: 95 });
  const meta = await sharp(drawn).metadata();
  const w = Math.round(meta.width! * scale), h = Math.round(meta.height! * scale);
  const base = await sharp(drawn).resize(w, h, { kernel: 'cubic' }).removeAlpha().raw().toBuffer();
  const noise = await sharp({ create: { width: w, height: h, channels: 3, background: '#000', noise: { type: 'gaussian', mean: 0, sigma: 4 } } }).raw().toBuffer();
  return sharp(base, { raw: { width: w, height: h, channels: 3 } }).composite([{ input: noise, raw: { width: w, height: h, channels: 3 }, blend: 'add' }]).jpeg({ quality: 90 }).toBuffer();
}

export interface GrowOptions {
  patientId: string;
  practitionerId: string;
  visits: number;
  views?: readonly PortraitView[];
  /** Identity of the invented face. */
  seed: number;
  /** Enlargement of the drawn portrait; 3 gives 2400×3000 frontal photos (display variant 1638×2048). */
  scale?: number;
  /** Distinct lip volumes drawn; visits reuse them in order (a history of top-ups). */
  distinct?: number;
  /** Days between visits. */
  everyDays?: number;
  onProgress?: (done: number, total: number) => void;
}

/** Books `visits` past visits for the patient and uploads every view at each; returns the visit ids, oldest first. */
export async function growPatient(api: ApiSession, o: GrowOptions): Promise<string[]> {
  const views = o.views ?? PORTRAIT_VIEWS;
  const distinct = o.distinct ?? 10;
  const every = o.everyDays ?? 14;
  const scale = o.scale ?? 3;
  const cache = new Map<string, Buffer>();
  const photo = async (view: PortraitView, k: number) => {
    const key = `${view}:${k}`;
    if (!cache.has(key)) cache.set(key, await cameraLikePortrait(view, o.seed, 0.15 + (0.8 * k) / Math.max(1, distinct - 1), k, scale));
    return cache.get(key)!;
  };
  const ids: string[] = [];
  let done = 0;
  const start = Date.now() - (o.visits * every + 1) * 86_400_000;
  for (let i = 0; i < o.visits; i++) {
    const visit = await api.call<{ id: string }>('POST', `/api/patients/${o.patientId}/visits`, {
      startsAt: new Date(start + i * every * 86_400_000).toISOString(),
      kind: i === 0 ? 'consultation' : i % 2 ? 'treatment' : 'review',
      practitionerId: o.practitionerId,
    });
    ids.push(visit.id);
    const k = Math.min(distinct - 1, Math.floor((i * distinct) / o.visits));
    for (const view of views) {
      await api.upload(visit.id, view, await photo(view, k));
      o.onProgress?.(++done, o.visits * views.length);
    }
  }
  return ids;
}

/** Waits until no photo of the patient is still being aligned (the worker runs after each upload). */
export async function waitForAlignment(api: ApiSession, patientId: string, timeoutMs = 15 * 60_000): Promise<{ aligned: number; needsLandmarks: number }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const photos = await api.call<{ alignmentState: string }[]>('GET', `/api/patients/${patientId}/photos`);
    const pending = photos.filter((p) => p.alignmentState === 'aligning').length;
    if (!pending) {
      return { aligned: photos.filter((p) => p.alignmentState === 'aligned').length, needsLandmarks: photos.filter((p) => p.alignmentState === 'needs-landmarks').length };
    }
    if (Date.now() > deadline) throw new Error(`${pending} photos still aligning after ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

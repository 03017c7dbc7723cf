// The reader's wasm as one of the app's own hashed assets: served from this origin, never a CDN (the CSP is self-only).
import wasmUrl from 'zxing-wasm/reader/zxing_reader.wasm?url';
import { configureBarcodeReader, readLabel, type LabelPixels, type LabelRead } from './barcode';

let configured = false;

/** `readLabel` with the wasm located in the built app. Loaded on demand by the scanner. */
export function readLabelInBrowser(pixels: LabelPixels): Promise<LabelRead> {
  if (!configured) {
    configureBarcodeReader({ locateFile: (path, prefix) => (path.endsWith('.wasm') ? wasmUrl : prefix + path) });
    configured = true;
  }
  return readLabel(pixels);
}

/** The longest edge a frame is decoded at: enough modules for a label code, small enough for ~5 reads a second. */
const MAX_EDGE = 1280;

/** RGBA pixels of a video frame or an image, scaled down to `MAX_EDGE`. */
export function pixelsOf(source: CanvasImageSource & { width?: number; height?: number; videoWidth?: number; videoHeight?: number }, canvas: HTMLCanvasElement): LabelPixels | null {
  const w = source.videoWidth ?? (source.width as number);
  const h = source.videoHeight ?? (source.height as number);
  if (!w || !h) return null;
  const scale = Math.min(1, MAX_EDGE / Math.max(w, h));
  canvas.width = Math.round(w * scale);
  canvas.height = Math.round(h * scale);
  const ctx = canvas.getContext('2d', { willReadFrequently: true })!;
  ctx.drawImage(source, 0, 0, canvas.width, canvas.height);
  return ctx.getImageData(0, 0, canvas.width, canvas.height);
}

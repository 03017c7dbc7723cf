/**
 * Automatic 68-point face landmarks. The face model sits behind this one module so a clinic can swap it: the
 * markup's licence caveat (FACTS 5) may make another model preferable, and manual landmarks always remain possible.
 *
 * Model: @vladmandic/face-api (tiny face detector + 68-point landmark net) on the tfjs WebAssembly backend, with the
 * weights shipped inside the npm package, loaded from disk once per process (STACK.md pitfall 9: the package's main
 * entry needs tfjs-node, so the wasm build is deep-imported).
 */
import { createRequire } from 'node:module';
import path from 'node:path';
import sharp from 'sharp';
import type { Point } from './umeyama.js';

const require = createRequire(import.meta.url);

export interface FaceBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface LandmarkDetection {
  /** 68 points in the pixel coordinates of the (auto-oriented) input image, iBUG 300-W order. */
  points: Point[];
  /** Detector confidence, 0–1. */
  score: number;
  /** Face box of the detector, input pixels. */
  box: FaceBox;
}

/** Decoded pixels as the model receives them, plus the factor back to the input's coordinates. */
export interface ModelInput {
  data: Buffer;
  width: number;
  height: number;
  /** Input pixels per model-input pixel. */
  factor: number;
}

/*
 * The detector looks at a 416 px square and the landmark net at a 112 px crop of the face, so pixels beyond about
 * 512 px on the long edge only cost time (a face filling a standard view is still over 200 px wide there); measured on
 * the synthetic face, the points land as close to the drawn ones from 512 px as from 1024 px. JPEG shrink-on-load
 * makes a 2048 px photo's decode to 512 px a few milliseconds.
 */
const WORK_LONG_EDGE = 512;
const DETECTOR_INPUT = 416;
const MIN_SCORE = 0.5;

// Minimal view of the face-api surface used here; the package's own types pull in the browser build.
interface FaceApi {
  tf: {
    setBackend(name: string): Promise<boolean>;
    ready(): Promise<void>;
    getBackend(): string;
    tensor3d(values: Uint8Array, shape: [number, number, number], dtype: 'int32'): { dispose(): void };
  };
  nets: { tinyFaceDetector: { loadFromDisk(dir: string): Promise<void> }; faceLandmark68Net: { loadFromDisk(dir: string): Promise<void> } };
  TinyFaceDetectorOptions: new (o: { inputSize: number; scoreThreshold: number }) => unknown;
  detectAllFaces(input: unknown, options: unknown): {
    withFaceLandmarks(): Promise<
      { detection: { score: number; box: { x: number; y: number; width: number; height: number } }; landmarks: { positions: { x: number; y: number }[] } }[]
    >;
  };
}

let ready: Promise<FaceApi> | null = null;

/** Loads the backend and the weights once; later calls share the same promise. */
export function loadLandmarkModel(): Promise<FaceApi> {
  ready ??= (async () => {
    const faceapi = require('@vladmandic/face-api/dist/face-api.node-wasm.js') as FaceApi;
    await faceapi.tf.setBackend('wasm');
    await faceapi.tf.ready();
    const dir = path.join(path.dirname(require.resolve('@vladmandic/face-api/package.json')), 'model');
    await faceapi.nets.tinyFaceDetector.loadFromDisk(dir);
    await faceapi.nets.faceLandmark68Net.loadFromDisk(dir);
    return faceapi;
  })().catch((err) => {
    ready = null;
    throw err;
  });
  return ready;
}

/** Decodes (auto-oriented, sRGB, no alpha) and shrinks the image to the model's working size. */
export async function decodeForModel(image: Buffer): Promise<ModelInput> {
  const meta = await sharp(image, { failOn: 'error' }).metadata();
  const swap = (meta.orientation ?? 1) >= 5;
  const w = swap ? meta.height : meta.width;
  const h = swap ? meta.width : meta.height;
  if (!w || !h) throw new Error('The image has no size.');
  const long = Math.max(w, h);
  let pipeline = sharp(image, { failOn: 'error' }).rotate();
  if (long > WORK_LONG_EDGE) {
    const f = WORK_LONG_EDGE / long;
    pipeline = pipeline.resize(Math.max(1, Math.round(w * f)), Math.max(1, Math.round(h * f)), { fit: 'fill' });
  }
  const { data, info } = await pipeline.removeAlpha().toColourspace('srgb').raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height, factor: w / info.width };
}

/** Runs the detector and the landmark net on decoded pixels: every face found, best first, in model-input pixels. */
export async function runLandmarkModel(input: ModelInput): Promise<LandmarkDetection[]> {
  const faceapi = await loadLandmarkModel();
  const tensor = faceapi.tf.tensor3d(new Uint8Array(input.data.buffer, input.data.byteOffset, input.data.length), [input.height, input.width, 3], 'int32');
  try {
    const found = await faceapi.detectAllFaces(tensor, new faceapi.TinyFaceDetectorOptions({ inputSize: DETECTOR_INPUT, scoreThreshold: MIN_SCORE })).withFaceLandmarks();
    return found
      .map((f) => ({
        points: f.landmarks.positions.map((p) => [p.x, p.y] as Point),
        score: f.detection.score,
        box: { x: f.detection.box.x, y: f.detection.box.y, width: f.detection.box.width, height: f.detection.box.height },
      }))
      .sort((a, b) => b.score * b.box.width * b.box.height - a.score * a.box.width * a.box.height);
  } finally {
    tensor.dispose();
  }
}

function toInputCoordinates(d: LandmarkDetection, f: number): LandmarkDetection {
  return {
    points: d.points.map(([x, y]) => [x * f, y * f] as Point),
    score: d.score,
    box: { x: d.box.x * f, y: d.box.y * f, width: d.box.width * f, height: d.box.height * f },
  };
}

/** Every face found in an encoded image, the most prominent (score × area) first. */
export async function detectAllLandmarks(image: Buffer): Promise<LandmarkDetection[]> {
  const input = await decodeForModel(image);
  return (await runLandmarkModel(input)).map((d) => toInputCoordinates(d, input.factor));
}

/** The 68 landmarks of the most prominent face in an encoded image, or null when no face is found. */
export async function detectLandmarks(image: Buffer): Promise<LandmarkDetection | null> {
  return (await detectAllLandmarks(image))[0] ?? null;
}

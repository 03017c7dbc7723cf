/**
 * Automatic face landmarks. The face model sits behind this one module so a clinic can swap it: the 68-point markup's
 * licence caveat (FACTS 5) may make another model preferable, and manual landmarks always remain possible. The model
 * step itself (`runLandmarkModel`) is a pure function from decoded pixels to points, so it can move to a worker thread.
 *
 * Models, both with their weights inside their npm packages, both on the tfjs WebAssembly backend (STACK.md pitfall
 * 9: the packages' main entries need tfjs-node, so the wasm builds are deep-imported; weights load from disk once):
 * - @vladmandic/human: the BlazeFace detector, the 468-point face mesh and the iris model. It finds the face (also
 *   turned 45°, where the 68-point detector below finds none), frames it, gives the iris for a mm scale and the dense
 *   lip contour (40 points) drawn on the compare screen.
 * - @vladmandic/face-api: the 68-point landmark net, run on the face box the mesh gives. Its points carry the
 *   68-point names the measurements use.
 *
 * Why both, measured here (scratch runs recorded in the issue's closing report): on dlib's example faces (box ≥ 40 px,
 * 21 faces, six crops each) the mesh found 126 of 126 crops where face-api's tiny detector found 94; on ten small
 * perturbations of the astronaut portrait (±3 px, ±3 %, ±2°, ±0.2 EV, JPEG 80–95) the upper:lower ratio's spread was
 * 0.04–0.08 from the mesh's lip points and 0.013–0.028 from the 68-point net, so the named points come from the net on
 * frontal faces. On a face turned beyond `MESH_POINTS_YAW` the net (trained on near-frontal faces) is unreliable and the
 * 68 points are read off the mesh (`MESH_TO_68`).
 */
import { createRequire } from 'node:module';
import fs from 'node:fs';
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

export interface IrisFit {
  centre: Point;
  /** Horizontal visible iris diameter, input pixels. */
  diameterPx: number;
}

export interface LandmarkDetection {
  /** 68 points in the pixel coordinates of the (auto-oriented) input image, iBUG 300-W order. */
  points: Point[];
  /** Detector confidence, 0–1. */
  score: number;
  /** Face box, input pixels (the 68-point net's framing). */
  box: FaceBox;
  /** Where the 68 points come from: the 68-point net, or the mesh on a turned face. */
  pointsFrom: 'net' | 'mesh';
  /** Head turn from the mesh, degrees; positive shows the subject's left side (the sign convention of pose.ts). */
  yaw: number;
  /** The iris of the subject's right and left eye, when the iris model placed it. */
  iris: { right: IrisFit | null; left: IrisFit | null };
  /** Dense lip contour from the mesh: outer and inner edge, 20 points each, from the right corner along the upper lip. */
  lipContour: { outer: Point[]; inner: Point[] };
}

/** Decoded pixels as the model receives them, plus the factor back to the input's coordinates. */
export interface ModelInput {
  data: Buffer | Uint8Array;
  width: number;
  height: number;
  /** Input pixels per model-input pixel. */
  factor: number;
}

/*
 * The detector looks at a 256 px square, the mesh at a 192 px crop of the face and the 68-point net at 112 px, so
 * pixels beyond about 512 px on the long edge only cost time (a face filling a standard view is still over 200 px wide
 * there). JPEG shrink-on-load makes a 2048 px photo's decode to 512 px a few milliseconds.
 */
const WORK_LONG_EDGE = 512;
const MIN_SCORE = 0.5;
/** Beyond this head turn (degrees) the 68 points are read off the mesh instead of the 68-point net. */
export const MESH_POINTS_YAW = 20;

/**
 * Mesh vertex for each of the 68 points (0-based iBUG order). The lip, eye and nose-tip vertices follow the mesh's
 * own topology (outer lip ring 61…291 → 17, inner ring 78…308 → 14; eye corners 33/133, 362/263; nose tip 4; chin
 * 152); jaw, brows and nose base are the nearest vertices to the 68-point positions.
 */
export const MESH_TO_68 = [
  162, 234, 93, 58, 172, 136, 149, 148, 152, 377, 378, 365, 397, 288, 323, 454, 389, 71, 63, 105, 66, 107, 336, 296, 334, 293, 301, 168, 197, 5, 4,
  75, 97, 2, 326, 305, 33, 160, 158, 133, 153, 144, 362, 385, 387, 263, 373, 380, 61, 39, 37, 0, 267, 269, 291, 405, 314, 17, 84, 181, 78, 82, 13,
  312, 308, 317, 14, 87,
] as const;
/** The mesh's lip rings, from the subject's right corner along the upper lip and back along the lower one. */
const LIP_OUTER = [61, 185, 40, 39, 37, 0, 267, 269, 270, 409, 291, 375, 321, 405, 314, 17, 84, 181, 91, 146] as const;
const LIP_INNER = [78, 191, 80, 81, 82, 13, 312, 311, 310, 415, 308, 324, 318, 402, 317, 14, 87, 178, 88, 95] as const;
/** Iris vertices of the refined mesh: a centre and four points on the iris edge, per eye. */
const IRIS_SETS = [
  [468, 469, 470, 471, 472],
  [473, 474, 475, 476, 477],
] as const;

// Minimal views of the two packages' surfaces used here; their own types pull in browser builds.
interface Tensor {
  dispose(): void;
  shape: number[];
}
interface Tf {
  setBackend(name: string): Promise<boolean>;
  ready(): Promise<void>;
  tensor3d(values: Uint8Array, shape: [number, number, number], dtype: 'int32'): Tensor;
  expandDims(t: Tensor, axis: number): Tensor;
  slice(t: Tensor, begin: number[], size: number[]): Tensor;
  io: { registerLoadRouter(r: (url: string) => unknown): void };
}
interface FaceApi {
  tf: Tf;
  nets: { faceLandmark68Net: { loadFromDisk(dir: string): Promise<void>; detectLandmarks(t: Tensor): Promise<{ positions: { x: number; y: number }[] }> } };
}
interface HumanFace {
  score: number;
  box: [number, number, number, number];
  mesh: number[][];
  rotation?: { angle: { yaw: number; roll: number; pitch: number } } | null;
}
interface Human {
  load(): Promise<void>;
  detect(input: Tensor): Promise<{ face: HumanFace[] }>;
}

interface Models {
  tf: Tf;
  faceapi: FaceApi;
  human: Human;
}

let ready: Promise<Models> | null = null;

/** tfjs reads `file://` model URLs only through tfjs-node; this router serves the shipped graph models from disk. */
function registerFileLoader(tf: Tf): void {
  tf.io.registerLoadRouter((url: string) => {
    if (typeof url !== 'string' || !url.startsWith('file://')) return null;
    const file = url.slice('file://'.length);
    return {
      load: async () => {
        const json = JSON.parse(await fs.promises.readFile(file, 'utf8'));
        const groups = json.weightsManifest as { paths: string[]; weights: unknown[] }[];
        const parts = await Promise.all(groups.flatMap((g) => g.paths.map((p) => fs.promises.readFile(path.join(path.dirname(file), p)))));
        const all = Buffer.concat(parts);
        return {
          modelTopology: json.modelTopology,
          weightSpecs: groups.flatMap((g) => g.weights),
          weightData: all.buffer.slice(all.byteOffset, all.byteOffset + all.length),
        };
      },
    };
  });
}

/** Loads the backend and the weights once; later calls share the same promise. */
export function loadLandmarkModel(): Promise<Models> {
  ready ??= (async () => {
    const faceapi = require('@vladmandic/face-api/dist/face-api.node-wasm.js') as FaceApi;
    // The package's export map has no "./dist/…" keys for the wasm build; resolve it beside the main entry.
    const humanDir = path.dirname(path.dirname(require.resolve('@vladmandic/human')));
    const { Human } = require(path.join(humanDir, 'dist/human.node-wasm.js')) as { Human: new (config: unknown) => Human };
    const tf = faceapi.tf;
    registerFileLoader(tf);
    await tf.setBackend('wasm');
    await tf.ready();
    const human = new Human({
      backend: 'wasm',
      // Without a path the package points the wasm backend at a CDN; the files ship in tfjs-backend-wasm.
      wasmPath: path.dirname(require.resolve('@tensorflow/tfjs-backend-wasm')) + path.sep,
      modelBasePath: `file://${path.join(humanDir, 'models')}/`,
      debug: false,
      warmup: 'none',
      cacheModels: false,
      cacheSensitivity: 0,
      filter: { enabled: false },
      gesture: { enabled: false },
      body: { enabled: false },
      hand: { enabled: false },
      object: { enabled: false },
      segmentation: { enabled: false },
      face: {
        enabled: true,
        // Rotation correction of the crop made the lip points less repeatable in the perturbation runs; heads in clinic
        // photos are near upright, and the 68-point net gets an upright box either way.
        detector: { rotation: false, maxDetected: 4, minConfidence: 0.3, skipFrames: 0, skipTime: 0 },
        mesh: { enabled: true },
        iris: { enabled: true },
        attention: { enabled: false },
        description: { enabled: false },
        emotion: { enabled: false },
        antispoof: { enabled: false },
        liveness: { enabled: false },
        gear: { enabled: false },
      },
    });
    await human.load();
    await faceapi.nets.faceLandmark68Net.loadFromDisk(path.join(path.dirname(require.resolve('@vladmandic/face-api/package.json')), 'model'));
    return { tf, faceapi, human };
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

const mean = (ps: readonly Point[]): Point => [ps.reduce((s, p) => s + p[0], 0) / ps.length, ps.reduce((s, p) => s + p[1], 0) / ps.length];

/**
 * The iris of each eye: the iris set nearer the eye's mesh centre; the horizontal diameter is the distance between
 * the two edge points lying most nearly along the eye line.
 */
function irisFits(mesh: Point[], rightEye: Point, leftEye: Point): LandmarkDetection['iris'] {
  const out: LandmarkDetection['iris'] = { right: null, left: null };
  if (mesh.length < 478) return out;
  const ex = [leftEye[0] - rightEye[0], leftEye[1] - rightEye[1]];
  const en = Math.hypot(ex[0], ex[1]) || 1;
  for (const set of IRIS_SETS) {
    const [c, ...edge] = set.map((i) => mesh[i]);
    const pairs = [[edge[0], edge[2]], [edge[1], edge[3]]].map(([a, b]) => {
      const d: Point = [b[0] - a[0], b[1] - a[1]];
      return { len: Math.hypot(d[0], d[1]), along: Math.abs(d[0] * ex[0] + d[1] * ex[1]) / en };
    });
    const horizontal = pairs[0].along >= pairs[1].along ? pairs[0] : pairs[1];
    const fit: IrisFit = { centre: c, diameterPx: horizontal.len };
    const toRight = Math.hypot(c[0] - rightEye[0], c[1] - rightEye[1]);
    const toLeft = Math.hypot(c[0] - leftEye[0], c[1] - leftEye[1]);
    if (toRight < toLeft) out.right = fit;
    else out.left = fit;
  }
  return out;
}

/**
 * The 68-point net's framing from the mesh: its tiny detector's box, measured against the mesh's bounding box on the
 * astronaut and three demo faces, sits 0.14 of the width further left and 0.04 of the height lower, 1.29 times as wide
 * and 1.04 times as tall.
 */
function netBox(mesh: Point[]): FaceBox {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i < 468; i++) {
    const [x, y] = mesh[i];
    x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y);
  }
  const w = x1 - x0, h = y1 - y0;
  return { x: x0 - 0.14 * w, y: y0 + 0.04 * h, width: 1.29 * w, height: 1.04 * h };
}

/** Runs the models on decoded pixels: every face found, the most prominent (score × area) first, model-input pixels. */
export async function runLandmarkModel(input: ModelInput): Promise<LandmarkDetection[]> {
  const { tf, faceapi, human } = await loadLandmarkModel();
  const bytes = input.data instanceof Uint8Array ? new Uint8Array(input.data.buffer, input.data.byteOffset, input.data.length) : input.data;
  const image = tf.tensor3d(bytes, [input.height, input.width, 3], 'int32');
  const batch = tf.expandDims(image, 0);
  try {
    const found = (await human.detect(batch)).face.filter((f) => f.score >= MIN_SCORE && f.mesh.length >= 468);
    const out: LandmarkDetection[] = [];
    for (const f of found) {
      const mesh = f.mesh.map((p) => [p[0], p[1]] as Point);
      // The mesh's yaw is positive when the subject's left side is shown, as in pose.ts (checked on the demo obliques).
      const yaw = ((f.rotation?.angle.yaw ?? 0) * 180) / Math.PI;
      const fromMesh = MESH_TO_68.map((i) => mesh[i]);
      let points = fromMesh;
      let pointsFrom: LandmarkDetection['pointsFrom'] = 'mesh';
      const box = netBox(mesh);
      if (Math.abs(yaw) <= MESH_POINTS_YAW) {
        const x0 = Math.max(0, Math.floor(box.x)), y0 = Math.max(0, Math.floor(box.y));
        const x1 = Math.min(input.width, Math.ceil(box.x + box.width)), y1 = Math.min(input.height, Math.ceil(box.y + box.height));
        if (x1 - x0 >= 16 && y1 - y0 >= 16) {
          const crop = tf.slice(image, [y0, x0, 0], [y1 - y0, x1 - x0, 3]);
          try {
            const lm = await faceapi.nets.faceLandmark68Net.detectLandmarks(crop);
            points = lm.positions.map((p) => [p.x + x0, p.y + y0] as Point);
            pointsFrom = 'net';
          } finally {
            crop.dispose();
          }
        }
      }
      const rightEye = mean(points.slice(36, 42)), leftEye = mean(points.slice(42, 48));
      out.push({
        points,
        score: f.score,
        box,
        pointsFrom,
        yaw,
        iris: irisFits(mesh, rightEye, leftEye),
        lipContour: { outer: LIP_OUTER.map((i) => mesh[i]), inner: LIP_INNER.map((i) => mesh[i]) },
      });
    }
    return out.sort((a, b) => b.score * b.box.width * b.box.height - a.score * a.box.width * a.box.height);
  } finally {
    batch.dispose();
    image.dispose();
  }
}

/** The same detection in another pixel space: every coordinate times `f`. */
export function scaleDetection(d: LandmarkDetection, f: number): LandmarkDetection {
  const s = (p: Point): Point => [p[0] * f, p[1] * f];
  const iris = (i: IrisFit | null) => (i ? { centre: s(i.centre), diameterPx: i.diameterPx * f } : null);
  return {
    ...d,
    points: d.points.map(s),
    box: { x: d.box.x * f, y: d.box.y * f, width: d.box.width * f, height: d.box.height * f },
    iris: { right: iris(d.iris.right), left: iris(d.iris.left) },
    lipContour: { outer: d.lipContour.outer.map(s), inner: d.lipContour.inner.map(s) },
  };
}

/*
 * The mesh reports whole pixels of its input, so an iris about 8 px wide in the 512 px working copy would carry a
 * ±6 % rounding error into the mm scale. The iris is therefore read again from a crop of the face at the photo's own
 * pixels, enlarged to this width (the iris then spans about 40 px).
 */
const IRIS_CROP_WIDTH = 512;

/** The iris of the face in `box` (input pixels of `image`), read from a crop at the photo's own resolution. */
async function irisAtFullResolution(image: Buffer, box: FaceBox, size: { width: number; height: number }): Promise<LandmarkDetection['iris'] | null> {
  const grow = 0.15;
  const x0 = Math.max(0, Math.floor(box.x - grow * box.width)), y0 = Math.max(0, Math.floor(box.y - grow * box.height));
  const x1 = Math.min(size.width, Math.ceil(box.x + (1 + grow) * box.width)), y1 = Math.min(size.height, Math.ceil(box.y + (1 + grow) * box.height));
  if (x1 - x0 < 32 || y1 - y0 < 32) return null;
  const f = IRIS_CROP_WIDTH / (x1 - x0);
  const { data, info } = await sharp(image, { failOn: 'error' })
    .rotate()
    .extract({ left: x0, top: y0, width: x1 - x0, height: y1 - y0 })
    .resize(IRIS_CROP_WIDTH, Math.max(1, Math.round((y1 - y0) * f)), { fit: 'fill', kernel: 'lanczos3' })
    .removeAlpha()
    .toColourspace('srgb')
    .raw()
    .toBuffer({ resolveWithObject: true });
  const [face] = await runLandmarkModel({ data, width: info.width, height: info.height, factor: 1 / f });
  if (!face) return null;
  const back = (i: IrisFit | null): IrisFit | null => (i ? { centre: [i.centre[0] / f + x0, i.centre[1] / f + y0], diameterPx: i.diameterPx / f } : null);
  return { right: back(face.iris.right), left: back(face.iris.left) };
}

/** Every face found in an encoded image, the most prominent (score × area) first; the first one's iris at full resolution. */
export async function detectAllLandmarks(image: Buffer): Promise<LandmarkDetection[]> {
  const input = await decodeForModel(image);
  const found = (await runLandmarkModel(input)).map((d) => scaleDetection(d, input.factor));
  if (found[0] && Math.abs(found[0].yaw) <= MESH_POINTS_YAW) {
    const iris = await irisAtFullResolution(image, found[0].box, { width: Math.round(input.width * input.factor), height: Math.round(input.height * input.factor) });
    if (iris) found[0] = { ...found[0], iris };
  }
  return found;
}

/** The landmarks of the most prominent face in an encoded image, or null when no face is found. */
export async function detectLandmarks(image: Buffer): Promise<LandmarkDetection | null> {
  return (await detectAllLandmarks(image))[0] ?? null;
}

/**
 * The views of a shot list, their alignment anchors and the standard frame each view is resampled into
 * (DESIGN §3, §7; FACTS 10). Pure data plus small helpers; no I/O.
 *
 * Point indices follow the iBUG 300-W 68-point markup (FACTS 5): 0-based, the subject's right eye is 36–41
 * (on the image's left in a frontal photo), the subject's left eye 42–47.
 */
import type { Rect } from './quality.js';
import type { Point } from './umeyama.js';

export const VIEW_KEYS = [
  'frontal-rest',
  'frontal-smile',
  'lips-rest',
  'lips-pucker',
  'oblique-left',
  'oblique-right',
  'lateral-left',
  'lateral-right',
] as const;
export type ViewKey = (typeof VIEW_KEYS)[number];

/** How one anchor is read from a full 68-point set: the mean of these indices. */
export interface AnchorDef {
  key: string;
  label: string;
  from68: readonly number[];
  /** Where the anchor sits in the view's standard frame, in output pixels. */
  frame: Point;
}

/** How a view is aligned: on the face's stable points, on the lip corners, or anchors placed by hand. */
export type AnchorKind = 'face' | 'lips' | 'profile';

export interface ViewDef {
  key: string;
  label: string;
  kind: AnchorKind;
  /** Yaw the view asks for, degrees; positive shows the subject's left side (see pose.ts). */
  expectedYaw: number;
  /** Largest |yaw − expectedYaw| before the photo is flagged as not fitting its view. */
  yawTolerance: number;
  /** Whether measurements of the lips are made on this view (DESIGN §7). */
  measured: boolean;
  frame: { width: number; height: number };
  anchors: readonly AnchorDef[];
  /**
   * Points of a full 68-point set the transform is fitted on, and where each sits in the frame. Views without it
   * fit their anchors alone.
   */
  stable?: { from68: readonly number[]; frame: readonly Point[] };
  /** Region of the frame that treatment does not change, where image registration refines the fit (frame pixels). */
  stableRegion: Rect;
}


const RIGHT_EYE = [36, 37, 38, 39, 40, 41] as const;
const LEFT_EYE = [42, 43, 44, 45, 46, 47] as const;

// Portrait 4:5 frame; interpupillary distance 300 px leaves room for the hair above and the neck below.
const FRONTAL_FRAME = { width: 1200, height: 1500 };

/**
 * A reference face in the frontal frame: the mean 68-point shape of the 43 faces in dlib's example landmark files
 * (CC public domain; their points come from dlib's 68-point model), aligned by generalised Procrustes, made
 * left–right symmetric and placed with the eye centres on the frontal anchors (450, 620) and (750, 620).
 * Recomputed by the media-align test from those files when they are present.
 */
export const REFERENCE_FACE_68: readonly Point[] = [
  [244.3, 641.2], [248.1, 735.0], [256.8, 826.5], [275.1, 917.5], [311.7, 1001.6], [369.2, 1072.9],
  [438.5, 1133.8], [514.9, 1183.3], [600.0, 1197.0], [685.1, 1183.3], [761.5, 1133.8], [830.8, 1072.9],
  [888.3, 1001.6], [924.9, 917.5], [943.2, 826.5], [952.0, 735.0], [955.8, 641.2], [321.5, 557.3],
  [361.2, 516.3], [418.5, 500.1], [479.3, 505.0], [537.4, 527.8], [662.6, 527.8], [720.7, 505.0],
  [781.5, 500.1], [838.8, 516.3], [878.5, 557.3], [600.0, 605.9], [600.0, 663.1], [600.0, 719.7],
  [600.0, 779.9], [529.3, 819.9], [563.2, 833.6], [600.0, 844.9], [636.8, 833.6], [670.7, 819.9],
  [392.9, 623.0], [429.8, 603.6], [471.3, 603.1], [507.6, 625.7], [470.2, 632.2], [428.3, 632.4],
  [692.4, 625.7], [728.7, 603.1], [770.2, 603.6], [807.1, 623.0], [771.7, 632.4], [729.8, 632.2],
  [454.6, 934.9], [504.7, 907.7], [560.9, 899.5], [600.0, 905.4], [639.1, 899.5], [695.3, 907.7],
  [745.4, 934.9], [698.4, 993.2], [642.6, 1015.4], [600.0, 1018.9], [557.4, 1015.4], [501.6, 993.2],
  [475.2, 937.9], [560.4, 923.4], [600.0, 927.8], [639.5, 923.4], [724.8, 937.9], [641.2, 974.0],
  [600.0, 979.2], [558.8, 974.0],
];

/**
 * The points a frontal photo is fitted on: brows 17–26, nose 27–35 and eyes 36–47. Many points average out the
 * detector's jitter (two eye centres alone multiply it towards the mouth), and none of them is on the lips, jaw or
 * chin, which treatment and expression move.
 */
export const STABLE_68 = Array.from({ length: 31 }, (_, i) => 17 + i);
const frontalStable = { from68: STABLE_68, frame: STABLE_68.map((i) => REFERENCE_FACE_68[i]) };
/** Brows to the base of the nose, between the outer brow ends: no lip, no jaw. */
const FRONTAL_STABLE_REGION: Rect = { x: 300, y: 450, width: 600, height: 420 };
const frontalAnchors: readonly AnchorDef[] = [
  { key: 'right-eye-centre', label: "Centre of the patient's right eye", from68: RIGHT_EYE, frame: [450, 620] },
  { key: 'left-eye-centre', label: "Centre of the patient's left eye", from68: LEFT_EYE, frame: [750, 620] },
];

// Landscape 8:5 frame for the close-up; the mouth spans the middle 40 % so a fuller or puckered lip still fits.
const LIPS_FRAME = { width: 1600, height: 1000 };
/** Above the upper lip (nose base and philtrum) in the close-up frame; the lips themselves stay out. */
const LIPS_STABLE_REGION: Rect = { x: 400, y: 40, width: 800, height: 280 };
const lipsAnchors: readonly AnchorDef[] = [
  { key: 'right-lip-corner', label: "Patient's right lip corner", from68: [48], frame: [480, 500] },
  { key: 'left-lip-corner', label: "Patient's left lip corner", from68: [54], frame: [1120, 500] },
];

/*
 * Oblique and lateral views: the outer corner of the near eye (exocanthion), the tip of the nose (pronasale) and
 * the chin (the 68-point jaw point 8). Why these three: all stay visible from 45° to 90°, where the far eye and the
 * far lip corner disappear behind the nose and cheek; they are firm landmarks that lip filler does not move (an
 * anchor on the lips would hide the very change being photographed); and they span the face from the eyes to the
 * chin, so three points fix rotation and scale well and the least-squares fit averages out small placement errors.
 * Near eye: with the patient's left side shown, that is the left eye's outer corner (45); with the right side, 36.
 * Frame positions follow a rough average head (from memory, in mm from the outer eye corner: nose tip 45 ahead and
 * 40 below, chin 35 ahead and 110 below), turned by the view's angle and seen from afar (ahead-offsets × sin of the
 * turn, plus the eye corner's half-width × cos): 4.4 px per mm. The exact figures matter little: every visit of a
 * view is fitted to the same three positions, so pairs line up; they only keep the head upright and centred.
 * "Ahead" points to the side the patient faces on screen: the image's left for a left view.
 */
const SIDE_FRAME = { width: 1200, height: 1500 };
const PX_PER_MM = 4.4;
function sideAnchors(side: 'left' | 'right', turnDeg: number): readonly AnchorDef[] {
  const dir = side === 'left' ? -1 : 1;
  const t = (turnDeg * Math.PI) / 180;
  // The eye corner's own offset towards the back of the head (half the outer-corner width × cos of the turn).
  const ahead = (mm: number) => Math.round(dir * PX_PER_MM * (mm * Math.sin(t) + 45 * Math.cos(t)));
  const eyeX = 600 - dir * 110;
  return [
    { key: 'near-eye-outer-corner', label: `Outer corner of the patient's ${side} eye`, from68: [side === 'left' ? 45 : 36], frame: [eyeX, 600] },
    { key: 'nose-tip', label: 'Tip of the nose', from68: [30], frame: [eyeX + ahead(45), 600 + 40 * PX_PER_MM] },
    { key: 'chin', label: 'Chin (lowest front point)', from68: [8], frame: [eyeX + ahead(35), 600 + 110 * PX_PER_MM] },
  ];
}
/** Around the near eye and the nose, down to the nose tip: the part of a turned face that treatment of the lips leaves alone. */
function sideStableRegion(side: 'left' | 'right', turnDeg: number): Rect {
  const [eye, nose] = sideAnchors(side, turnDeg);
  const x0 = Math.min(eye.frame[0], nose.frame[0]) - 90, x1 = Math.max(eye.frame[0], nose.frame[0]) + 90;
  return { x: x0, y: eye.frame[1] - 130, width: x1 - x0, height: nose.frame[1] - eye.frame[1] + 150 };
}

export const VIEWS: Readonly<Record<ViewKey, ViewDef>> = {
  'frontal-rest': { key: 'frontal-rest', kind: 'face', label: 'Frontal, at rest', expectedYaw: 0, yawTolerance: 10, measured: true, frame: FRONTAL_FRAME, anchors: frontalAnchors, stable: frontalStable, stableRegion: FRONTAL_STABLE_REGION },
  'frontal-smile': { key: 'frontal-smile', kind: 'face', label: 'Frontal, smiling', expectedYaw: 0, yawTolerance: 10, measured: false, frame: FRONTAL_FRAME, anchors: frontalAnchors, stable: frontalStable, stableRegion: FRONTAL_STABLE_REGION },
  'lips-rest': { key: 'lips-rest', kind: 'lips', label: 'Lips close-up, at rest', expectedYaw: 0, yawTolerance: 10, measured: true, frame: LIPS_FRAME, anchors: lipsAnchors, stableRegion: LIPS_STABLE_REGION },
  'lips-pucker': { key: 'lips-pucker', kind: 'lips', label: 'Lips close-up, pucker', expectedYaw: 0, yawTolerance: 10, measured: false, frame: LIPS_FRAME, anchors: lipsAnchors, stableRegion: LIPS_STABLE_REGION },
  'oblique-left': { key: 'oblique-left', kind: 'face', label: 'Oblique left 45°', expectedYaw: 45, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('left', 45), stableRegion: sideStableRegion('left', 45) },
  'oblique-right': { key: 'oblique-right', kind: 'face', label: 'Oblique right 45°', expectedYaw: -45, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('right', 45), stableRegion: sideStableRegion('right', 45) },
  'lateral-left': { key: 'lateral-left', kind: 'profile', label: 'Lateral left 90°', expectedYaw: 90, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('left', 90), stableRegion: sideStableRegion('left', 90) },
  'lateral-right': { key: 'lateral-right', kind: 'profile', label: 'Lateral right 90°', expectedYaw: -90, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('right', 90), stableRegion: sideStableRegion('right', 90) },
};

export function isViewKey(v: string): v is ViewKey {
  return (VIEW_KEYS as readonly string[]).includes(v);
}

/**
 * The alignment definition of a shot-list view. The built-in views keep their own (oblique views, marked "face" in the
 * shot list because the model usually sees the face, still align on eye corner, nose tip and chin); a view an admin
 * added borrows the definition of its kind: "face" the frontal one, "lips" the close-up, "profile" the lateral one of
 * the side its key names (left unless the key says right).
 */
export function resolveView(key: string, kind: AnchorKind, label?: string): ViewDef {
  if (isViewKey(key)) return VIEWS[key];
  const base =
    kind === 'lips' ? VIEWS['lips-rest'] : kind === 'profile' ? VIEWS[/right/.test(key) ? 'lateral-right' : 'lateral-left'] : VIEWS['frontal-rest'];
  return { ...base, key, kind, label: label ?? key, measured: kind !== 'profile' && !/smile|pucker/.test(key) };
}

/** The view's anchors read from a full 68-point set (each the mean of its indices). */
export function anchorsFrom68(view: ViewDef, points: readonly Point[]): Point[] {
  return view.anchors.map((a) => {
    let x = 0, y = 0;
    for (const i of a.from68) {
      x += points[i][0];
      y += points[i][1];
    }
    return [x / a.from68.length, y / a.from68.length] as Point;
  });
}

export function frameAnchors(view: ViewDef): Point[] {
  return view.anchors.map((a) => a.frame);
}

/** Photo points and their frame positions for the view's transform fit. */
export interface FitPoints {
  src: Point[];
  dst: Point[];
  /** `stable-points`: the view's stable 68-point subset; `anchors`: the view's anchors (read from the points or placed). */
  from: 'stable-points' | 'anchors';
}

const placed = (p: Point | null | undefined): p is Point => !!p && Number.isFinite(p[0]) && Number.isFinite(p[1]);

/** The fit for a photo: the stable points when all of them are marked, else the anchors. */
export function fitPoints(view: ViewDef, points: readonly (Point | null | undefined)[] | null, anchors: readonly Point[]): FitPoints {
  if (view.stable && points && points.length === 68 && view.stable.from68.every((i) => placed(points[i]))) {
    return { src: view.stable.from68.map((i) => points[i] as Point), dst: [...view.stable.frame], from: 'stable-points' };
  }
  return { src: [...anchors], dst: frameAnchors(view), from: 'anchors' };
}

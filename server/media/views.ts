/**
 * The views of a shot list, their alignment anchors and the standard frame each view is resampled into
 * (DESIGN §3, §7; FACTS 10). Pure data plus small helpers; no I/O.
 *
 * Point indices follow the iBUG 300-W 68-point markup (FACTS 5): 0-based, the subject's right eye is 36–41
 * (on the image's left in a frontal photo), the subject's left eye 42–47.
 */
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

/** How a view is aligned: the 68-point model on the eye centres, on the lip corners, or anchors placed by hand. */
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
}

const RIGHT_EYE = [36, 37, 38, 39, 40, 41] as const;
const LEFT_EYE = [42, 43, 44, 45, 46, 47] as const;

// Portrait 4:5 frame; interpupillary distance 300 px leaves room for the hair above and the neck below.
const FRONTAL_FRAME = { width: 1200, height: 1500 };
const frontalAnchors: readonly AnchorDef[] = [
  { key: 'right-eye-centre', label: "Centre of the patient's right eye", from68: RIGHT_EYE, frame: [450, 620] },
  { key: 'left-eye-centre', label: "Centre of the patient's left eye", from68: LEFT_EYE, frame: [750, 620] },
];

// Landscape 8:5 frame for the close-up; the mouth spans the middle 40 % so a fuller or puckered lip still fits.
const LIPS_FRAME = { width: 1600, height: 1000 };
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

export const VIEWS: Readonly<Record<ViewKey, ViewDef>> = {
  'frontal-rest': { key: 'frontal-rest', kind: 'face', label: 'Frontal, at rest', expectedYaw: 0, yawTolerance: 10, measured: true, frame: FRONTAL_FRAME, anchors: frontalAnchors },
  'frontal-smile': { key: 'frontal-smile', kind: 'face', label: 'Frontal, smiling', expectedYaw: 0, yawTolerance: 10, measured: false, frame: FRONTAL_FRAME, anchors: frontalAnchors },
  'lips-rest': { key: 'lips-rest', kind: 'lips', label: 'Lips close-up, at rest', expectedYaw: 0, yawTolerance: 10, measured: true, frame: LIPS_FRAME, anchors: lipsAnchors },
  'lips-pucker': { key: 'lips-pucker', kind: 'lips', label: 'Lips close-up, pucker', expectedYaw: 0, yawTolerance: 10, measured: false, frame: LIPS_FRAME, anchors: lipsAnchors },
  'oblique-left': { key: 'oblique-left', kind: 'face', label: 'Oblique left 45°', expectedYaw: 45, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('left', 45) },
  'oblique-right': { key: 'oblique-right', kind: 'face', label: 'Oblique right 45°', expectedYaw: -45, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('right', 45) },
  'lateral-left': { key: 'lateral-left', kind: 'profile', label: 'Lateral left 90°', expectedYaw: 90, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('left', 90) },
  'lateral-right': { key: 'lateral-right', kind: 'profile', label: 'Lateral right 90°', expectedYaw: -90, yawTolerance: 15, measured: false, frame: SIDE_FRAME, anchors: sideAnchors('right', 90) },
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

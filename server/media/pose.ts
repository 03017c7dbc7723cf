/**
 * Head pose from landmarks and the plain warnings that come from it (DESIGN §7, issue: pose and pairing).
 * Pure functions, no I/O. Indices follow the iBUG 300-W 68-point markup (FACTS 5).
 */
import { eyeCentres, type Landmarks68 } from './measurements.js';
import type { Point } from './umeyama.js';
import type { ViewDef } from './views.js';

export interface Pose {
  /** Tilt of the eye line (or the lip-corner line on a lips close-up) from the image horizontal, degrees; positive when it falls towards the image's right. */
  roll: number | null;
  /** Head turn, degrees, approximate; positive when the subject's left side is shown (the nose points to the image's left). Null without the 68 points. */
  yaw: number | null;
  /** Drop of the nose tip below the eye line in IPD units; compared with the baseline to spot a chin raised or lowered. */
  noseDrop: number | null;
  /** Pixels per unit of the view's reference length before alignment (the IPD, or the mouth width on a lips close-up). */
  unitPx: number | null;
}

export interface PoseWarning {
  code: 'yaw-view' | 'roll-view' | 'yaw-baseline' | 'pitch-baseline' | 'scale-baseline';
  message: string;
}

/*
 * Yaw model: seen from the front, the outer eye corners sit at ±W and the nose tip a depth D in front of them. Turned
 * by ψ, under a distant camera, the corners project to ±W·cos ψ and the nose tip to −D·sin ψ, so the nose tip's
 * position between the corners, t = ((p30 − p36)·u)/((p45 − p36)·u), is 0.5 − (D/2W)·tan ψ, i.e.
 * ψ = atan((1 − 2t)·W/D). W/D ≈ 1 for an average adult head (about 45 mm half-width between the outer eye corners and
 * about as much depth to the nose tip; from memory, a rough figure): at 45° the nose tip reaches the far eye's outer
 * corner, the usual check for an oblique view. Good to a few degrees near frontal, coarser beyond 30°.
 */
const HALF_WIDTH_OVER_DEPTH = 1;

const deg = (rad: number) => (rad * 180) / Math.PI;
const valid = (p: Point | null | undefined): p is Point => !!p && Number.isFinite(p[0]) && Number.isFinite(p[1]);

function lineAngle(a: Point, b: Point): number {
  return deg(Math.atan2(b[1] - a[1], b[0] - a[0]));
}

/**
 * Pose from a 68-point set when there is one, else from the view's anchors (roll only, for the frontal and lips
 * views whose two anchors form the horizontal reference).
 */
export function estimatePose(view: ViewDef, points: Landmarks68 | null, anchors: readonly Point[] | null): Pose {
  const isLips = view.kind === 'lips';
  if (points && points.length === 68) {
    const eyes = eyeCentres(points);
    if (eyes && !isLips) {
      const ipd = Math.hypot(eyes.left[0] - eyes.right[0], eyes.left[1] - eyes.right[1]);
      const u: Point = [(eyes.left[0] - eyes.right[0]) / ipd, (eyes.left[1] - eyes.right[1]) / ipd];
      const v: Point = [-u[1], u[0]];
      let yaw: number | null = null;
      let noseDrop: number | null = null;
      const [p30, p36, p45] = [points[30], points[36], points[45]];
      if (valid(p30) && valid(p36) && valid(p45)) {
        const span = (p45[0] - p36[0]) * u[0] + (p45[1] - p36[1]) * u[1];
        if (span > 0) {
          const t = ((p30[0] - p36[0]) * u[0] + (p30[1] - p36[1]) * u[1]) / span;
          yaw = deg(Math.atan((1 - 2 * t) * HALF_WIDTH_OVER_DEPTH));
        }
        const mid: Point = [(eyes.left[0] + eyes.right[0]) / 2, (eyes.left[1] + eyes.right[1]) / 2];
        noseDrop = ((p30[0] - mid[0]) * v[0] + (p30[1] - mid[1]) * v[1]) / ipd;
      }
      return { roll: lineAngle(eyes.right, eyes.left), yaw, noseDrop, unitPx: ipd };
    }
    const [p48, p54] = [points[48], points[54]];
    if (valid(p48) && valid(p54)) {
      return { roll: lineAngle(p48, p54), yaw: null, noseDrop: null, unitPx: Math.hypot(p54[0] - p48[0], p54[1] - p48[1]) };
    }
  }
  if (anchors && anchors.length === 2 && (isLips || (view.kind === 'face' && view.expectedYaw === 0))) {
    const [a, b] = anchors;
    return { roll: lineAngle(a, b), yaw: null, noseDrop: null, unitPx: Math.hypot(b[0] - a[0], b[1] - a[1]) };
  }
  return { roll: null, yaw: null, noseDrop: null, unitPx: null };
}

/** Thresholds of the plain warnings; "a few degrees" from the baseline. */
export const POSE_LIMITS = {
  rollView: 10,
  yawBaseline: 5,
  /** Relative change of the nose drop; about 5° of pitch for an average head (30 mm nose depth over 50 mm drop). */
  noseDropBaseline: 0.06,
  /** Ratio of reference lengths in pixels; the camera distance changes perspective, which alignment cannot undo. */
  scaleBaseline: 1.3,
} as const;

const fmt = (x: number) => `${Math.round(Math.abs(x))}°`;

/** Plain warnings for a photo's pose against its view and, when given, against the baseline photo of the same view. */
export function poseWarnings(view: ViewDef, pose: Pose, baseline?: Pose | null): PoseWarning[] {
  const out: PoseWarning[] = [];
  if (pose.yaw !== null && Math.abs(pose.yaw - view.expectedYaw) > view.yawTolerance) {
    const side = pose.yaw > 0 ? "the patient's left side" : "the patient's right side";
    const expects = view.expectedYaw === 0 ? 'a straight-on face' : `a turn of about ${fmt(view.expectedYaw)}`;
    out.push({ code: 'yaw-view', message: `The head looks turned about ${fmt(pose.yaw)}, showing more of ${side}; ${view.label} expects ${expects}.` });
  }
  if (pose.roll !== null && view.expectedYaw === 0 && Math.abs(pose.roll) > POSE_LIMITS.rollView) {
    out.push({ code: 'roll-view', message: `The head is tilted about ${fmt(pose.roll)}; alignment straightens the image, but a tilted head can also be turned or raised.` });
  }
  if (baseline) {
    if (pose.yaw !== null && baseline.yaw !== null && Math.abs(pose.yaw - baseline.yaw) > POSE_LIMITS.yawBaseline) {
      out.push({ code: 'yaw-baseline', message: `The head is turned about ${fmt(pose.yaw - baseline.yaw)} differently from the baseline photo of this view.` });
    }
    if (pose.noseDrop !== null && baseline.noseDrop !== null && baseline.noseDrop > 0) {
      const rel = pose.noseDrop / baseline.noseDrop - 1;
      if (Math.abs(rel) > POSE_LIMITS.noseDropBaseline) {
        out.push({ code: 'pitch-baseline', message: `The chin looks ${rel < 0 ? 'raised' : 'lowered'} compared with the baseline photo of this view.` });
      }
    }
    if (pose.unitPx && baseline.unitPx) {
      const r = pose.unitPx / baseline.unitPx;
      if (r > POSE_LIMITS.scaleBaseline || r < 1 / POSE_LIMITS.scaleBaseline) {
        out.push({ code: 'scale-baseline', message: `The face is ${r > 1 ? 'larger' : 'smaller'} in the frame than in the baseline photo (×${r.toFixed(2)}); a different camera distance changes perspective.` });
      }
    }
  }
  return out;
}

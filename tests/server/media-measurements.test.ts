import { describe, expect, it } from 'vitest';
import {
  changeSince,
  formatRatio,
  measureLips,
  MeasurementInputError,
  rulerScale,
  type Landmarks68,
} from '../../server/media/measurements.js';
import { estimatePose, poseWarnings } from '../../server/media/pose.js';
import { applySimilarity, type Point } from '../../server/media/umeyama.js';
import { VIEWS } from '../../server/media/views.js';

/**
 * A face built by hand in the iBUG 300-W 68-point order (Sagonas et al. 2016; FACTS 5), frontal and level.
 * Eye centres (300, 400) and (500, 400): IPD = 200 px. Inner eye corners (endocanthion) 39 = (330, 400), 42 = (470, 400).
 * Lips (closed mouth: the whole inner edge 60–67 lies on y = 700):
 *   corners 48 = (310, 700), 54 = (490, 700); upper outer 49 (350, 680), 50 (380, 670), 51 (400, 680), 52 (420, 670),
 *   53 (450, 680); lower outer 55 (450, 725), 56 (425, 738), 57 (400, 740), 58 (375, 738), 59 (350, 725).
 */
function handFace(): Point[] {
  const p: Point[] = Array.from({ length: 68 }, (_, i) => [100 + i, 100] as Point);
  const eye = (start: number, cx: number) => {
    const offs: Point[] = [[-30, 0], [-15, -10], [15, -10], [30, 0], [15, 10], [-15, 10]];
    offs.forEach((o, k) => (p[start + k] = [cx + o[0], 400 + o[1]]));
  };
  eye(36, 300);
  eye(42, 500);
  p[30] = [400, 560];
  p[8] = [400, 900];
  const lips: Record<number, Point> = {
    48: [310, 700], 49: [350, 680], 50: [380, 670], 51: [400, 680], 52: [420, 670], 53: [450, 680], 54: [490, 700],
    55: [450, 725], 56: [425, 738], 57: [400, 740], 58: [375, 738], 59: [350, 725],
    60: [320, 700], 61: [360, 700], 62: [400, 700], 63: [440, 700], 64: [480, 700], 65: [440, 700], 66: [400, 700], 67: [360, 700],
  };
  for (const [i, q] of Object.entries(lips)) p[Number(i)] = q;
  return p;
}

const deg = (r: number) => (r * 180) / Math.PI;

describe('lip measurements on a hand-built landmark set', () => {
  const m = measureLips(handFace());

  it('measures vermilion heights, ratio and mouth width (FACTS 6 definitions)', () => {
    // Upper: labrale superius 51 (y 680) → stomion 62 (y 700) = 20 px = 0.1 IPD.
    expect(m.upperHeight.px).toBeCloseTo(20, 12);
    expect(m.upperHeight.rel).toBeCloseTo(0.1, 12);
    // Lower: stomion 66 (y 700) → labrale inferius 57 (y 740) = 40 px; ratio 1:(40/20) = 1:2.
    expect(m.lowerHeight.px).toBeCloseTo(40, 12);
    expect(m.ratio).toBeCloseTo(2, 12);
    expect(formatRatio(m.ratio)).toBe('1:2.0');
    // Cheilion 48 → 54: 490 − 310 = 180 px = 0.9 IPD.
    expect(m.mouthWidth.px).toBeCloseTo(180, 12);
    expect(m.mouthWidth.rel).toBeCloseTo(0.9, 12);
    expect(m.unit).toBe('ipd');
    expect(m.axis).toBe('eye-line');
  });

  it("measures the cupid's bow", () => {
    // Peaks 50 and 52 at y 670 against 51 at y 680: 10 px each; peak to peak 420 − 380 = 40 px.
    expect(m.cupidsBow.rightPeakHeight.px).toBeCloseTo(10, 12);
    expect(m.cupidsBow.leftPeakHeight.px).toBeCloseTo(10, 12);
    expect(m.cupidsBow.peakToPeak.px).toBeCloseTo(40, 12);
  });

  it('measures areas and their left/right symmetry', () => {
    // Upper lip between the outer polyline and y = 700, as trapezoids from x 310 to 490:
    // 40·20/2 + 30·(20+30)/2 + 20·(30+20)/2 = 400 + 750 + 500 = 1650 on each side → 3300 px².
    expect(m.upperLip.whole.px2).toBeCloseTo(3300, 9);
    expect(m.upperLip.right.px2).toBeCloseTo(1650, 9);
    expect(m.upperLip.left.px2).toBeCloseTo(1650, 9);
    expect(m.upperLip.symmetry).toBeCloseTo(1, 12);
    // Lower lip: 40·25/2 + 25·(25+38)/2 + 25·(38+40)/2 = 500 + 787.5 + 975 = 2262.5 per side → 4525 px².
    expect(m.lowerLip.whole.px2).toBeCloseTo(4525, 9);
    expect(m.lowerLip.right.px2).toBeCloseTo(2262.5, 9);
    // Total 7825 px² = 7825 / 200² IPD².
    expect(m.totalArea.px2).toBeCloseTo(7825, 9);
    expect(m.totalArea.rel).toBeCloseTo(7825 / 40000, 12);
  });

  it('measures the commissure angles as in FACTS 8 (Klimach et al. 2020)', () => {
    // At 48: commissure line to the right (180, 0), endocanthion line to 39 (20, −300): 90° − atan(20/300).
    const expected = 90 - deg(Math.atan(20 / 300));
    expect(m.commissureAngle.right).toBeCloseTo(expected, 10);
    expect(m.commissureAngle.left).toBeCloseTo(expected, 10);
    expect(m.commissureAngle.difference).toBeCloseTo(0, 10);

    // Left corner 10 px lower: at 48 the commissure line dips atan(10/180) away from the endocanthion line,
    // at 54 it rises by the same towards it, and 42 is now 310 px above: 90° − atan(20/310) − atan(10/180).
    const p = handFace();
    p[54] = [490, 710];
    const tilted = measureLips(p);
    expect(tilted.commissureAngle.right).toBeCloseTo(90 - deg(Math.atan(20 / 300)) + deg(Math.atan(10 / 180)), 10);
    expect(tilted.commissureAngle.left).toBeCloseTo(90 - deg(Math.atan(20 / 310)) - deg(Math.atan(10 / 180)), 10);
    expect(tilted.commissureAngle.difference).toBeCloseTo(2 * deg(Math.atan(10 / 180)) - deg(Math.atan(20 / 300)) + deg(Math.atan(20 / 310)), 10);
  });

  it('gives mm from a ruler, or an approximate scale from the mean IPD of 63 mm (FACTS 9, from memory)', () => {
    // Dodgson, SPIE 2004 (FACTS 9, from memory): 63 mm over 200 px = 0.315 mm/px, labelled approximate.
    expect(m.scale).toEqual({ mmPerPx: 0.315, source: 'mean-ipd', approximate: true });
    expect(m.upperHeight.mm).toBeCloseTo(6.3, 12);
    // Ruler: 50 mm between (100, 900) and (300, 900) → 0.25 mm/px.
    const ruled = measureLips(handFace(), { scale: rulerScale([100, 900], [300, 900], 50) });
    expect(ruled.scale).toEqual({ mmPerPx: 0.25, source: 'ruler', approximate: false });
    expect(ruled.upperHeight.mm).toBeCloseTo(5, 12);
    expect(ruled.lowerHeight.mm).toBeCloseTo(10, 12);
    expect(ruled.mouthWidth.mm).toBeCloseTo(45, 12);
    expect(ruled.totalArea.mm2).toBeCloseTo(7825 * 0.0625, 9);
    expect(() => rulerScale([1, 1], [1, 1], 10)).toThrow(MeasurementInputError);
    expect(() => rulerScale([1, 1], [50, 1], 0)).toThrow(MeasurementInputError);
  });

  it('gives the same ratios, relative lengths and angles on a rotated, scaled and moved copy', () => {
    const t = { scale: 1.7, angle: (23 * Math.PI) / 180, translation: [-120, 340] as Point };
    const moved = measureLips(handFace().map((p) => applySimilarity(t, p)));
    expect(moved.ratio).toBeCloseTo(2, 10);
    expect(moved.upperHeight.rel).toBeCloseTo(0.1, 10);
    expect(moved.upperHeight.px).toBeCloseTo(20 * 1.7, 9);
    expect(moved.mouthWidth.rel).toBeCloseTo(0.9, 10);
    expect(moved.totalArea.rel).toBeCloseTo(7825 / 40000, 10);
    expect(moved.totalArea.px2).toBeCloseTo(7825 * 1.7 ** 2, 6);
    expect(moved.upperLip.symmetry).toBeCloseTo(1, 10);
    expect(moved.commissureAngle.right).toBeCloseTo(m.commissureAngle.right!, 10);
    expect(moved.cupidsBow.leftPeakHeight.rel).toBeCloseTo(m.cupidsBow.leftPeakHeight.rel, 10);
    // Image-axis heights would be wrong here: the face's axis, perpendicular to the eye line, is used.
    const p51 = applySimilarity(t, [400, 680]), p62 = applySimilarity(t, [400, 700]);
    expect(Math.abs(p62[1] - p51[1])).not.toBeCloseTo(moved.upperHeight.px, 1);
  });

  it('falls back to the lip-corner line and mouth-width units when the eyes are not marked (close-up)', () => {
    const p: (Point | null)[] = handFace();
    for (let i = 0; i < 48; i++) p[i] = null;
    const lips = measureLips(p);
    expect(lips.unit).toBe('mouth-width');
    expect(lips.axis).toBe('lip-corners');
    expect(lips.upperHeight.rel).toBeCloseTo(20 / 180, 12);
    expect(lips.ratio).toBeCloseTo(2, 12);
    expect(lips.scale).toBeNull();
    expect(lips.upperHeight.mm).toBeNull();
    expect(lips.commissureAngle.right).toBeNull();
  });

  it('reports the change since a baseline', () => {
    const after = handFace();
    after[51] = [400, 676]; // upper lip 4 px fuller at the midline: 20 → 24 px
    const change = changeSince(measureLips(after), m);
    expect(change.upperHeight!.from).toBeCloseTo(0.1, 12);
    expect(change.upperHeight!.to).toBeCloseTo(0.12, 12);
    expect(change.upperHeight!.pct).toBeCloseTo(20, 9);
    expect(change.ratio!.to).toBeCloseTo(40 / 24, 12);
    expect(change.lowerHeight!.delta).toBeCloseTo(0, 12);
    expect(change.totalArea!.delta).toBeGreaterThan(0);
    expect(change.mm!.upperHeight.delta).toBeCloseTo(4 * 0.315, 9);
  });

  it('refuses a set without the lip points or with the wrong number of slots', () => {
    const p: (Point | null)[] = handFace();
    p[57] = null;
    expect(() => measureLips(p)).toThrow(MeasurementInputError);
    expect(() => measureLips(handFace().slice(0, 67) as Landmarks68)).toThrow(MeasurementInputError);
  });
});

describe('pose', () => {
  /**
   * A head model for yaw: outer eye corners at (±45, 0, 0) mm, eye centres at (±31, 0, 0), nose tip at (0, 50, 45)
   * (the W/D ≈ 1 of pose.ts). Turned by ψ about the vertical axis and seen by a distant camera: x' = x·cos ψ − z·sin ψ.
   * Positive ψ shows the patient's left side: the nose tip moves towards the image's left.
   */
  function turnedHead(psiDeg: number): Point[] {
    const psi = (psiDeg * Math.PI) / 180;
    const proj = (x: number, y: number, z: number): Point => [400 + 4 * (x * Math.cos(psi) - z * Math.sin(psi)), 400 + 4 * y];
    const p = handFace();
    // Each eye's six points run from its first corner (36: outer; 42: inner) round the lid, as in the markup.
    const eye = (start: number, cx: number, first: number) => {
      const xs = [first, cx - (cx - first) / 2, cx + (cx - first) / 2, 2 * cx - first, cx + (cx - first) / 2, cx - (cx - first) / 2];
      xs.forEach((x, k) => (p[start + k] = proj(x, k === 0 || k === 3 ? 0 : k < 3 ? -2 : 2, 0)));
    };
    eye(36, -31, -45);
    eye(42, 31, 17);
    p[30] = proj(0, 50, 45);
    return p;
  }

  it('reads roll from the eye line and yaw from the nose tip between the outer eye corners', () => {
    for (const psi of [-30, -10, 0, 7, 20]) {
      const pose = estimatePose(VIEWS['frontal-rest'], turnedHead(psi), null);
      expect(pose.yaw).toBeCloseTo(psi, 6);
      expect(pose.roll).toBeCloseTo(0, 9);
    }
    // Rolling the whole picture 12° changes roll by 12° and leaves yaw alone.
    const t = { scale: 0.8, angle: (12 * Math.PI) / 180, translation: [50, -30] as Point };
    const rolled = estimatePose(VIEWS['frontal-rest'], turnedHead(8).map((p) => applySimilarity(t, p)), null);
    expect(rolled.roll).toBeCloseTo(12, 9);
    expect(rolled.yaw).toBeCloseTo(8, 6);
  });

  it('warns when a frontal photo is turned, and when a photo differs from the baseline by more than a few degrees', () => {
    const view = VIEWS['frontal-rest'];
    const straight = estimatePose(view, turnedHead(2), null);
    const turned = estimatePose(view, turnedHead(14), null);
    expect(poseWarnings(view, straight)).toEqual([]);
    expect(poseWarnings(view, turned).map((w) => w.code)).toEqual(['yaw-view']);
    expect(poseWarnings(view, estimatePose(view, turnedHead(9), null), straight).map((w) => w.code)).toEqual(['yaw-baseline']);
    expect(poseWarnings(VIEWS['oblique-left'], estimatePose(VIEWS['oblique-left'], turnedHead(44), null)).map((w) => w.code)).toEqual([]);
    expect(poseWarnings(VIEWS['oblique-left'], straight).map((w) => w.code)).toEqual(['yaw-view']);
  });

  it('reads roll from the two anchors when only anchors are placed', () => {
    const pose = estimatePose(VIEWS['lips-rest'], null, [[100, 100], [200, 110]]);
    expect(pose.roll).toBeCloseTo((Math.atan2(10, 100) * 180) / Math.PI, 12);
    expect(pose.yaw).toBeNull();
  });
});

import sharp from 'sharp';

/**
 * Invented, face-like portraits for the demo clinic: drawn as SVG and rasterised by sharp, so no photo of a real
 * person is ever used. Each identity (skin, hair, eyes, face shape) comes from a seed; the lip volume grows across
 * a patient's visits. Frontal portraits are drawn the way a general face detector recognises (oval head with a
 * radial skin gradient, hair, brows, eyes with iris and pupil, nose, two lip shapes with a cupid's bow, a slight
 * blur); oblique and lateral views turn the same head and are drawn more roughly.
 */
export const PORTRAIT_VIEWS = [
  'frontal-rest',
  'frontal-smile',
  'lips-rest',
  'lips-pucker',
  'oblique-left',
  'oblique-right',
  'lateral-left',
  'lateral-right',
] as const;
export type PortraitView = (typeof PORTRAIT_VIEWS)[number];

export interface PortraitParams {
  /** Identity: the same seed always draws the same invented person. */
  seed: number;
  view: PortraitView;
  /** 0 = thin lips … 1 = full lips. */
  lipVolume: number;
  /** Small per-photo differences (head tilt, framing, light), so two visits never match pixel for pixel. */
  shot?: number;
}

const SKIN = [
  ['#f6dcc8', '#e9c2a6', '#c9967a'],
  ['#f0cfb2', '#dcaa86', '#b4805e'],
  ['#e2b58f', '#c98f66', '#9c6644'],
  ['#c99470', '#a8704b', '#7a4b2f'],
  ['#b88260', '#8e5c3b', '#5c3722'],
  ['#9a6647', '#6e452e', '#40271a'],
] as const;
const HAIR = ['#2a1c13', '#4a3020', '#6e4a2c', '#a27b4c', '#17120f', '#7c3f25', '#c9a26a'] as const;
const IRIS = ['#4d6d8c', '#5b7d4e', '#6b4a2b', '#3b2a1c', '#778899', '#2f4f4f'] as const;
const LIPS = ['#c0646a', '#b5575f', '#a94f55', '#a04c5a', '#9a4658', '#8e4256'] as const;
const CLOTHES = ['#2f4858', '#55405e', '#3d5a45', '#5a4a3a', '#303a52'] as const;

/** A small deterministic PRNG (mulberry32), so a seed always draws the same face. */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const pick = <T,>(r: () => number, xs: readonly T[]) => xs[Math.floor(r() * xs.length) % xs.length];
const f1 = (n: number) => n.toFixed(1);

interface Identity {
  skin: readonly [string, string, string];
  hair: string;
  iris: string;
  lips: string;
  clothes: string;
  faceWidth: number;
  eyeSpacing: number;
  longHair: boolean;
}

function identity(seed: number): Identity {
  const r = rng(seed * 7919 + 17);
  const skinIndex = Math.floor(r() * SKIN.length);
  const darker = skinIndex >= 3;
  return {
    skin: SKIN[skinIndex],
    // Darker skin mostly comes with dark hair and brown eyes; lighter skin with any.
    hair: pick(r, darker ? HAIR.slice(0, 2).concat(HAIR[4]) : HAIR),
    iris: pick(r, darker ? IRIS.slice(2, 4) : IRIS),
    lips: LIPS[Math.min(LIPS.length - 1, skinIndex + Math.floor(r() * 2))],
    clothes: pick(r, CLOTHES),
    faceWidth: 0.93 + r() * 0.12,
    eyeSpacing: 76 + r() * 12,
    longHair: r() < 0.7,
  };
}

interface Pose {
  /** Yaw in radians; negative turns the face towards the image's left (the patient's left side shown). */
  yaw: number;
  expression: 'rest' | 'smile' | 'pucker';
}

function poseOf(view: PortraitView): Pose {
  const deg = Math.PI / 180;
  switch (view) {
    case 'frontal-smile':
      return { yaw: 0, expression: 'smile' };
    case 'lips-pucker':
      return { yaw: 0, expression: 'pucker' };
    case 'oblique-left':
      return { yaw: -45 * deg, expression: 'rest' };
    case 'oblique-right':
      return { yaw: 45 * deg, expression: 'rest' };
    case 'lateral-left':
      return { yaw: -88 * deg, expression: 'rest' };
    case 'lateral-right':
      return { yaw: 88 * deg, expression: 'rest' };
    default:
      return { yaw: 0, expression: 'rest' };
  }
}

const R = 200; // radius of the head's front surface, in drawing units

/** The SVG of one portrait (800 × 1000 drawing units; close-ups crop the mouth with the viewBox). */
export function portraitSvg(p: PortraitParams): string {
  const id = identity(p.seed);
  const pose = poseOf(p.view);
  const jitter = rng(p.seed * 31 + (p.shot ?? 0) * 101 + 5);
  const v = Math.max(0, Math.min(1, p.lipVolume));
  const cx = 400 + (jitter() - 0.5) * 16;
  const cy = 470 + (jitter() - 0.5) * 14;
  const tilt = (jitter() - 0.5) * 3;
  const sinY = Math.sin(pose.yaw);
  const cosY = Math.cos(pose.yaw);
  const facing = Math.sign(sinY);
  const rx = (190 + 25 * Math.abs(sinY)) * id.faceWidth;
  const ry = 245;

  /** Projects a point of the head (X right, Y down, Z towards the camera, origin at the head centre). */
  const px = (X: number, Z: number) => cx + X * cosY + Z * sinY;
  const depth = (X: number, Z: number) => -X * sinY + Z * cosY;
  const surfaceZ = (X: number, inset = 0) => Math.sqrt(Math.max(0, R * R - X * X)) - inset;
  const visible = (X: number, Z: number) => depth(X, Z) > 0.18 * Math.hypot(X, Z);

  const parts: string[] = [];
  const defs: string[] = [];

  // Background and shoulders.
  defs.push(`<linearGradient id="bg" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="#959ca1"/><stop offset="1" stop-color="#6d757a"/></linearGradient>`);
  defs.push(
    `<radialGradient id="skin" cx="${f1(0.5 + 0.18 * sinY)}" cy="0.42" r="0.62"><stop offset="0" stop-color="${id.skin[0]}"/><stop offset="0.62" stop-color="${id.skin[1]}"/><stop offset="1" stop-color="${id.skin[2]}"/></radialGradient>`,
  );
  parts.push(`<rect x="-400" y="-400" width="1600" height="1800" fill="url(#bg)"/>`);
  parts.push(`<path d="M ${f1(cx - 330)} 1000 C ${f1(cx - 300)} 820, ${f1(cx - 130)} 800, ${f1(cx)} 795 C ${f1(cx + 130)} 800, ${f1(cx + 300)} 820, ${f1(cx + 330)} 1000 Z" fill="${id.clothes}"/>`);

  // Hair behind the head, shifted towards the back of the head when it turns.
  const hairBackX = cx - 60 * sinY;
  // Hair frames the face down to the shoulders or, in a bob, to the jaw (a framed face is found more reliably).
  const hairEnd = id.longHair ? 360 : 215;
  const hairMid = id.longHair ? 200 : 120;
  parts.push(`<path d="M ${f1(hairBackX - rx - 40)} ${f1(cy - 40)} C ${f1(hairBackX - rx - 60)} ${f1(cy + hairMid)}, ${f1(hairBackX - rx - 20)} ${f1(cy + hairEnd - 30)}, ${f1(hairBackX - rx + 40)} ${f1(cy + hairEnd)} L ${f1(hairBackX + rx - 40)} ${f1(cy + hairEnd)} C ${f1(hairBackX + rx + 20)} ${f1(cy + hairEnd - 30)}, ${f1(hairBackX + rx + 60)} ${f1(cy + hairMid)}, ${f1(hairBackX + rx + 40)} ${f1(cy - 40)} Z" fill="${id.hair}"/>`);
  parts.push(`<ellipse cx="${f1(hairBackX)}" cy="${f1(cy - 40)}" rx="${f1(rx + 32)}" ry="${f1(ry + 14)}" fill="${id.hair}"/>`);

  // The neck in front of the long hair, so a close-up shows skin below the jaw.
  parts.push(`<path d="M ${f1(cx - 95 - 20 * facing)} ${f1(cy + 170)} L ${f1(cx - 100 - 30 * facing)} 830 Q ${f1(cx)} 870 ${f1(cx + 100 - 30 * facing)} 830 L ${f1(cx + 95 - 20 * facing)} ${f1(cy + 170)} Z" fill="${id.skin[2]}"/>`);
  // Head; in a turned head the jaw and chin stand out of the skull's outline, drawn first so the head covers the overlap.
  if (Math.abs(sinY) > 0.3) {
    const jaw = [
      [0, 95, surfaceZ(0, 8)],
      [0, 225, 150],
      [-facing * 60, 245, 110],
      [-facing * 150, 190, 20],
      [-facing * 160, 60, 0],
    ].map(([X, Y, Z]) => `${f1(px(X, Z))},${f1(cy + Y)}`);
    parts.push(`<polygon points="${jaw.join(' ')}" fill="${id.skin[1]}"/>`);
  }

  parts.push(`<ellipse cx="${f1(cx)}" cy="${f1(cy)}" rx="${f1(rx)}" ry="${ry}" fill="url(#skin)"/>`);
  // Ears.
  for (const side of [-1, 1]) {
    const X = side * 196;
    const Z = -12;
    if (depth(X, Z) > -0.45 * R) {
      const ex = px(X, Z);
      const w = Math.max(8, 26 * Math.abs(side * sinY) + 8);
      parts.push(`<ellipse cx="${f1(ex)}" cy="${f1(cy + 20)}" rx="${f1(w)}" ry="42" fill="${id.skin[2]}"/>`);
      parts.push(`<ellipse cx="${f1(ex)}" cy="${f1(cy + 22)}" rx="${f1(w * 0.45)}" ry="24" fill="${id.skin[1]}"/>`);
    }
  }

  // Hair on the head: a hairline across the forehead that drops to the nape on the side turned away.
  defs.push(`<clipPath id="headclip"><ellipse cx="${f1(cx)}" cy="${f1(cy)}" rx="${f1(rx + 10)}" ry="${ry + 10}"/></clipPath>`);
  const faceU = (R * sinY) / rx;
  // Where the visible ear sits across the head (−1 … 1); behind it the hair falls to the nape.
  const earU = facing === 0 ? 2 : (px(-facing * 196, -12) - cx) / rx;
  const hairline: string[] = [];
  for (let i = 0; i <= 60; i++) {
    const u = -1.05 + (2.1 * i) / 60;
    const d = u - faceU;
    let y = cy - 150 + 55 * d * d;
    if (facing !== 0) {
      // Towards the ear the hairline rises from the forehead to the temple, then drops behind the ear.
      const t = Math.max(0, Math.min(1, (-facing * (u - faceU)) / Math.max(0.1, -facing * (earU - faceU))));
      y = cy - 150 + 30 * t * t + 80 * t;
      const behind = -facing * (u - earU);
      if (behind > -0.1) y = cy - 40 + 160 * Math.max(0, Math.min(1, (behind + 0.02) / 0.2));
    }
    hairline.push(`${f1(cx + u * rx)},${f1(Math.min(cy + 120, y))}`);
  }
  parts.push(`<polygon clip-path="url(#headclip)" points="${f1(cx - rx - 20)},${f1(cy - ry - 40)} ${hairline.join(' ')} ${f1(cx + rx + 20)},${f1(cy - ry - 40)}" fill="${id.hair}"/>`);

  // Brows and eyes.
  const expression = pose.expression;
  for (const side of [-1, 1]) {
    const eyeX = side * id.eyeSpacing;
    const eyeZ = surfaceZ(eyeX, 38);
    if (!visible(eyeX, eyeZ + 38)) continue;
    const squash = Math.max(0.12, depth(eyeX, eyeZ + 38) / Math.hypot(eyeX, eyeZ + 38));
    const ex = px(eyeX, eyeZ);
    const ey = cy - 40;
    const hw = 36 * squash;
    const hh = expression === 'smile' ? 11 : 14;
    // Brow.
    const bz = surfaceZ(eyeX, 20);
    const b0 = px(eyeX - side * 48, bz);
    const b1 = px(eyeX + side * 52, surfaceZ(eyeX + side * 52, 25));
    parts.push(`<path d="M ${f1(b0)} ${f1(ey - 40)} Q ${f1((b0 + b1) / 2)} ${f1(ey - 62)} ${f1(b1)} ${f1(ey - 44)}" stroke="${id.hair}" stroke-width="11" fill="none" stroke-linecap="round"/>`);
    // Eye socket shading, sclera, iris, pupil, highlight, lid.
    parts.push(`<ellipse cx="${f1(ex)}" cy="${f1(ey - 4)}" rx="${f1(hw + 12)}" ry="${f1(hh + 10)}" fill="${id.skin[2]}" opacity="0.35"/>`);
    parts.push(`<path d="M ${f1(ex - hw)} ${f1(ey)} Q ${f1(ex)} ${f1(ey - 2 * hh)} ${f1(ex + hw)} ${f1(ey)} Q ${f1(ex)} ${f1(ey + 1.6 * hh)} ${f1(ex - hw)} ${f1(ey)} Z" fill="#f4f1ec"/>`);
    const irisX = ex + 4 * sinY;
    parts.push(`<ellipse cx="${f1(irisX)}" cy="${f1(ey - 1)}" rx="${f1(Math.max(3, 15 * squash))}" ry="${f1(Math.min(15, hh + 1))}" fill="${id.iris}"/>`);
    parts.push(`<ellipse cx="${f1(irisX)}" cy="${f1(ey - 1)}" rx="${f1(Math.max(1.5, 7 * squash))}" ry="7" fill="#111"/>`);
    parts.push(`<circle cx="${f1(irisX + 4 * squash)}" cy="${f1(ey - 5)}" r="2.6" fill="#fff"/>`);
    parts.push(`<path d="M ${f1(ex - hw - 3)} ${f1(ey + 1)} Q ${f1(ex)} ${f1(ey - 2 * hh - 3)} ${f1(ex + hw + 3)} ${f1(ey + 1)}" stroke="#2a1d17" stroke-width="3.5" fill="none"/>`);
  }

  // Nose.
  const tipZ = 238;
  if (Math.abs(sinY) < 0.2) {
    for (const side of [-1, 1]) {
      parts.push(`<path d="M ${f1(cx + side * 16)} ${f1(cy - 25)} Q ${f1(cx + side * 20)} ${f1(cy + 35)} ${f1(cx + side * 30)} ${f1(cy + 68)}" stroke="${id.skin[2]}" stroke-width="${side < 0 ? 6 : 3}" fill="none" opacity="${side < 0 ? 0.65 : 0.35}"/>`);
      // Cheek contour under the cheekbone.
      parts.push(`<path d="M ${f1(cx + side * rx * 0.92)} ${f1(cy + 10)} Q ${f1(cx + side * rx * 0.7)} ${f1(cy + 120)} ${f1(cx + side * rx * 0.42)} ${f1(cy + 200)}" stroke="${id.skin[2]}" stroke-width="16" fill="none" opacity="0.25"/>`);
    }
    parts.push(`<ellipse cx="${f1(cx)}" cy="${f1(cy + 66)}" rx="27" ry="19" fill="${id.skin[1]}"/>`);
    parts.push(`<ellipse cx="${f1(cx)}" cy="${f1(cy + 60)}" rx="12" ry="8" fill="${id.skin[0]}" opacity="0.7"/>`);
    for (const side of [-1, 1]) parts.push(`<ellipse cx="${f1(cx + side * 15)}" cy="${f1(cy + 78)}" rx="8" ry="4.5" fill="#3a2520"/>`);
    parts.push(`<path d="M ${f1(cx - 34)} ${f1(cy + 74)} Q ${f1(cx)} ${f1(cy + 92)} ${f1(cx + 34)} ${f1(cy + 74)}" stroke="${id.skin[2]}" stroke-width="3" fill="none" opacity="0.6"/>`);
  } else {
    const bridge = [px(0, surfaceZ(0, 20)), cy - 30];
    const tip = [px(0, tipZ), cy + 62];
    const base = [px(0, surfaceZ(0, 8)), cy + 86];
    const wing = [px(-facing * 30, surfaceZ(30, 5)), cy + 76];
    parts.push(`<path d="M ${f1(bridge[0])} ${f1(bridge[1])} Q ${f1(tip[0] + 4 * facing)} ${f1(cy + 20)} ${f1(tip[0])} ${f1(tip[1])} Q ${f1(tip[0] - 6 * facing)} ${f1(cy + 84)} ${f1(base[0])} ${f1(base[1])} L ${f1(wing[0])} ${f1(wing[1])} Z" fill="${id.skin[1]}" stroke="${id.skin[2]}" stroke-width="2"/>`);
    parts.push(`<ellipse cx="${f1((tip[0] + wing[0]) / 2)}" cy="${f1(cy + 80)}" rx="7" ry="4" fill="#3a2520" opacity="0.8"/>`);
  }

  // Lips: upper lip with a cupid's bow, lower lip fuller; volume grows with `lipVolume`.
  const mouthY = cy + 150;
  let halfW = 60 + 4 * v;
  let upper = 13 + 11 * v;
  let lower = 19 + 13 * v;
  let cornerLift = 0;
  let gap = 0;
  if (expression === 'smile') {
    halfW *= 1.24;
    upper *= 0.72;
    lower *= 0.8;
    cornerLift = 12;
    gap = 16;
  } else if (expression === 'pucker') {
    halfW *= 0.64;
    upper *= 1.3;
    lower *= 1.2;
  }
  const lipZ = (X: number) => surfaceZ(X, 6) + (expression === 'pucker' ? 14 : 0) * (1 - Math.abs(X) / halfW);
  const lp = (X: number, Y: number) => `${f1(px(X, lipZ(X)))} ${f1(mouthY + Y)}`;
  const bowX = 16 + 2 * v;
  const upperPath = `M ${lp(-halfW, -cornerLift)} C ${lp(-halfW * 0.7, -upper * 0.45 - cornerLift * 0.6)} ${lp(-bowX - 14, -upper)} ${lp(-bowX, -upper)} Q ${lp(-bowX / 2, -upper)} ${lp(0, -upper + 4 + 2 * v)} Q ${lp(bowX / 2, -upper)} ${lp(bowX, -upper)} C ${lp(bowX + 14, -upper)} ${lp(halfW * 0.7, -upper * 0.45 - cornerLift * 0.6)} ${lp(halfW, -cornerLift)} Q ${lp(0, 3 - cornerLift * 0.2)} ${lp(-halfW, -cornerLift)} Z`;
  const lowerPath = `M ${lp(-halfW, -cornerLift + 1)} Q ${lp(0, gap + 3)} ${lp(halfW, -cornerLift + 1)} C ${lp(halfW * 0.75, gap + lower * 0.75)} ${lp(halfW * 0.35, gap + lower)} ${lp(0, gap + lower)} C ${lp(-halfW * 0.35, gap + lower)} ${lp(-halfW * 0.75, gap + lower * 0.75)} ${lp(-halfW, -cornerLift + 1)} Z`;
  if (gap > 0) parts.push(`<path d="M ${lp(-halfW * 0.88, -cornerLift * 0.5)} Q ${lp(0, -4)} ${lp(halfW * 0.88, -cornerLift * 0.5)} Q ${lp(0, gap + 10)} ${lp(-halfW * 0.88, -cornerLift * 0.5)} Z" fill="#efe9df" stroke="#d8cfc2" stroke-width="1.5"/>`);
  defs.push(`<linearGradient id="lip" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="${id.lips}"/><stop offset="1" stop-color="#5e2a2c"/></linearGradient>`);
  parts.push(`<path d="${upperPath}" fill="url(#lip)"/>`);
  parts.push(`<path d="${lowerPath}" fill="${id.lips}"/>`);
  parts.push(`<ellipse cx="${f1(px(0, lipZ(0)))}" cy="${f1(mouthY + gap + lower * 0.45)}" rx="${f1(halfW * 0.35 * Math.max(0.3, cosY))}" ry="${f1(lower * 0.18)}" fill="#ffffff" opacity="0.18"/>`);
  parts.push(`<path d="M ${lp(-halfW - 2, -cornerLift)} Q ${lp(0, 3 - cornerLift * 0.2)} ${lp(halfW + 2, -cornerLift)}" stroke="#4a2224" stroke-width="2.5" fill="none"/>`);

  // Chin shading.
  parts.push(`<ellipse cx="${f1(px(0, 150))}" cy="${f1(cy + 218)}" rx="${f1(50 * Math.max(0.4, cosY))}" ry="18" fill="${id.skin[2]}" opacity="0.18"/>`);

  const close = p.view === 'lips-rest' || p.view === 'lips-pucker';
  const [vbW, vbH] = close ? [288, 180] : [800, 1000];
  const [vbX, vbY] = close ? [cx - vbW / 2, mouthY - vbH / 2 - 6] : [0, 0];
  const [outW, outH] = close ? [1600, 1000] : [800, 1000];
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${outW}" height="${outH}" viewBox="${f1(vbX)} ${f1(vbY)} ${vbW} ${vbH}">
<defs>${defs.join('')}</defs>
<g transform="rotate(${f1(tilt)} ${f1(cx)} ${f1(cy)})">${parts.join('\n')}</g>
</svg>`;
}

/** Rasterises a portrait to a camera-like JPEG, optionally with an EXIF capture time (UTC). */
export async function renderPortrait(p: PortraitParams, opts: { capturedAt?: string; quality?: number } = {}): Promise<Buffer> {
  const close = p.view === 'lips-rest' || p.view === 'lips-pucker';
  // A slight blur like a camera's (the close-up is drawn at a higher zoom, so its blur is wider), and a small
  // change of light from shot to shot.
  const light = 0.96 + rng(p.seed * 13 + (p.shot ?? 0) * 7)() * 0.08;
  let img = sharp(Buffer.from(portraitSvg(p)))
    .flatten({ background: '#7f868b' })
    .blur(close ? 2.2 : 1.2)
    .modulate({ brightness: light });
  if (opts.capturedAt) {
    const d = new Date(opts.capturedAt);
    const pad = (n: number) => String(n).padStart(2, '0');
    const exifTime = `${d.getUTCFullYear()}:${pad(d.getUTCMonth() + 1)}:${pad(d.getUTCDate())} ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}:${pad(d.getUTCSeconds())}`;
    img = img.withExif({ IFD2: { DateTimeOriginal: exifTime, OffsetTimeOriginal: '+00:00' } });
  }
  return img.jpeg({ quality: opts.quality ?? 88 }).toBuffer();
}

import type { KeyboardEvent } from 'react';
import { cn } from '../../../lib/cn';
import { ZONE_LABELS, type FillerZone, type LineKind, type ToxinZone, type ZoneKey } from '../zones';

type Shape =
  | { type: 'area'; d: string }
  | { type: 'band'; d: string; width: number }
  | { type: 'dot'; cx: number; cy: number; r: number }
  | { type: 'poly'; d: string };

/** The zones the diagram draws: every offered zone (the legacy whole-lip zones are read, not drawn). */
type DrawnZone = FillerZone | ToxinZone;
/** A zone drawn on one side of the midline only (x 320): the shape is clipped to that half. */
type Side = 'right' | 'left';

/**
 * The lips and lower face drawn as seen when facing the patient: the patient's right is on the viewer's left.
 * Commissures at x 130 and 510, the stomion around y 210, cupid's-bow peaks at x 282 and 358, the chin below y 350.
 */
const UPPER_OUTLINE = 'M130,205 C175,170 235,110 282,102 C296,100 308,120 320,122 C332,120 344,100 358,102 C405,110 465,170 510,205';
const STOMION_BACK = 'C420,214 370,210 320,214 C270,210 220,214 130,205';
const LOWER_OUTLINE = 'M130,205 C185,285 248,330 320,330 C392,330 455,285 510,205';
const UPPER_BODY = `${UPPER_OUTLINE} ${STOMION_BACK} Z`;
const LOWER_BODY = `${LOWER_OUTLINE} ${STOMION_BACK} Z`;
const UPPER_BORDER = 'M150,190 C190,158 238,112 276,104 M364,104 C402,112 450,158 490,190';
const LOWER_BORDER = 'M154,240 C202,298 256,330 320,330 C384,330 438,298 486,240';

const SHAPES: Record<DrawnZone, { kind: LineKind; shape: Shape; label: [number, number]; side?: Side }> = {
  'upper-body-right': { kind: 'filler', shape: { type: 'area', d: UPPER_BODY }, label: [236, 168], side: 'right' },
  'upper-body-left': { kind: 'filler', shape: { type: 'area', d: UPPER_BODY }, label: [404, 168], side: 'left' },
  'lower-body-right': { kind: 'filler', shape: { type: 'area', d: LOWER_BODY }, label: [256, 284], side: 'right' },
  'lower-body-left': { kind: 'filler', shape: { type: 'area', d: LOWER_BODY }, label: [384, 284], side: 'left' },
  'upper-vermilion-border-right': { kind: 'filler', shape: { type: 'band', d: UPPER_BORDER, width: 14 }, label: [178, 132], side: 'right' },
  'upper-vermilion-border-left': { kind: 'filler', shape: { type: 'band', d: UPPER_BORDER, width: 14 }, label: [462, 132], side: 'left' },
  'cupids-bow': { kind: 'filler', shape: { type: 'band', d: 'M278,103 C296,100 308,120 320,122 C332,120 344,100 362,103', width: 14 }, label: [320, 84] },
  'lower-vermilion-border-right': { kind: 'filler', shape: { type: 'band', d: LOWER_BORDER, width: 14 }, label: [196, 318], side: 'right' },
  'lower-vermilion-border-left': { kind: 'filler', shape: { type: 'band', d: LOWER_BORDER, width: 14 }, label: [444, 318], side: 'left' },
  'philtral-column-right': { kind: 'filler', shape: { type: 'band', d: 'M285,94 L297,30', width: 14 }, label: [262, 50] },
  'philtral-column-left': { kind: 'filler', shape: { type: 'band', d: 'M355,94 L343,30', width: 14 }, label: [378, 50] },
  'wet-dry-border-upper': { kind: 'filler', shape: { type: 'band', d: 'M172,200 C232,194 272,186 320,190 C368,186 408,194 468,200', width: 9 }, label: [230, 184] },
  'wet-dry-border-lower': { kind: 'filler', shape: { type: 'band', d: 'M174,224 C234,240 272,238 320,240 C368,238 406,240 466,224', width: 9 }, label: [410, 252] },
  'oral-commissure-right': { kind: 'filler', shape: { type: 'dot', cx: 130, cy: 206, r: 16 }, label: [94, 178] },
  'oral-commissure-left': { kind: 'filler', shape: { type: 'dot', cx: 510, cy: 206, r: 16 }, label: [546, 178] },
  'perioral-lines-upper': { kind: 'filler', shape: { type: 'band', d: 'M196,120 L186,86 M226,104 L218,68 M414,104 L422,68 M444,120 L454,86', width: 8 }, label: [170, 66] },
  'perioral-lines-lower': { kind: 'filler', shape: { type: 'band', d: 'M216,336 L208,362 M244,348 L238,374 M396,348 L402,374 M424,336 L432,362', width: 8 }, label: [470, 360] },
  'marionette-right': { kind: 'filler', shape: { type: 'band', d: 'M144,236 C148,268 154,300 166,338', width: 12 }, label: [176, 262] },
  'marionette-left': { kind: 'filler', shape: { type: 'band', d: 'M496,236 C492,268 486,300 474,338', width: 12 }, label: [464, 262] },
  'pre-jowl-sulcus-right': { kind: 'filler', shape: { type: 'band', d: 'M170,370 C182,384 198,394 218,400', width: 12 }, label: [150, 404] },
  'pre-jowl-sulcus-left': { kind: 'filler', shape: { type: 'band', d: 'M470,370 C458,384 442,394 422,400', width: 12 }, label: [490, 404] },
  chin: { kind: 'filler', shape: { type: 'area', d: 'M262,354 C282,346 358,346 378,354 C390,374 378,402 320,406 C262,402 250,374 262,354 Z' }, label: [320, 380] },
  'dao-right': { kind: 'toxin', shape: { type: 'poly', d: 'M102,250 L132,258 L112,354 L70,342 Z' }, label: [76, 384] },
  'dao-left': { kind: 'toxin', shape: { type: 'poly', d: 'M538,250 L508,258 L528,354 L570,342 Z' }, label: [564, 384] },
  mentalis: { kind: 'toxin', shape: { type: 'poly', d: 'M276,356 L364,356 L372,398 L268,398 Z' }, label: [320, 426] },
  'orbicularis-oris': { kind: 'toxin', shape: { type: 'band', d: 'M114,206 C160,118 250,70 320,78 C390,70 480,118 526,206 C470,326 392,350 320,350 C248,350 170,326 114,206 Z', width: 10 }, label: [320, 62] },
};

/** Points inside each drawn zone, clear of its neighbours, in diagram units (for tests and the keyboard focus ring). */
export const ZONE_TARGETS: Record<DrawnZone, [number, number]> = {
  'upper-body-right': [240, 172],
  'upper-body-left': [400, 172],
  'lower-body-right': [256, 280],
  'lower-body-left': [384, 280],
  'upper-vermilion-border-right': [200, 141],
  'upper-vermilion-border-left': [440, 141],
  'cupids-bow': [300, 109],
  'lower-vermilion-border-right': [260, 322],
  'lower-vermilion-border-left': [380, 322],
  'philtral-column-right': [291, 62],
  'philtral-column-left': [349, 62],
  'wet-dry-border-upper': [320, 190],
  'wet-dry-border-lower': [320, 240],
  'oral-commissure-right': [130, 206],
  'oral-commissure-left': [510, 206],
  'perioral-lines-upper': [222, 86],
  'perioral-lines-lower': [241, 361],
  'marionette-right': [151, 290],
  'marionette-left': [489, 290],
  'pre-jowl-sulcus-right': [194, 389],
  'pre-jowl-sulcus-left': [446, 389],
  chin: [320, 378],
  'dao-right': [100, 300],
  'dao-left': [540, 300],
  mentalis: [320, 378],
  'orbicularis-oris': [320, 78],
};

/** The drawing's coordinate box. */
export const VIEW_BOX = { x: 0, y: -24, width: 640, height: 470 };

/** Draw order: areas under borders, borders under the corner dots; toxin zones over the filler ones they share. */
const ORDER: DrawnZone[] = [
  'upper-body-right',
  'upper-body-left',
  'lower-body-right',
  'lower-body-left',
  'chin',
  'wet-dry-border-upper',
  'wet-dry-border-lower',
  'upper-vermilion-border-right',
  'upper-vermilion-border-left',
  'cupids-bow',
  'lower-vermilion-border-right',
  'lower-vermilion-border-left',
  'philtral-column-right',
  'philtral-column-left',
  'perioral-lines-upper',
  'perioral-lines-lower',
  'marionette-right',
  'marionette-left',
  'pre-jowl-sulcus-right',
  'pre-jowl-sulcus-left',
  'oral-commissure-right',
  'oral-commissure-left',
  'orbicularis-oris',
  'mentalis',
  'dao-right',
  'dao-left',
];

const fmt = (n: number) => String(Math.round(n * 100) / 100);

export interface LipDiagramProps {
  /** Zones of this kind can be tapped; the others are dimmed. */
  kind: LineKind;
  unit: 'mL' | 'U';
  /** Amount per zone of the line being edited. */
  amounts: Partial<Record<ZoneKey, number>>;
  /** The amount that counts as "a lot" for the fill strength (e.g. 1 mL, 5 U). */
  full: number;
  step: number;
  onTap: (zone: ZoneKey) => void;
  className?: string;
}

/** The clickable lip and lower-face diagram: tap a zone to add one step of the active line's product to it. */
export function LipDiagram({ kind, unit, amounts, full, step, onTap, className }: LipDiagramProps) {
  const onKey = (zone: ZoneKey) => (e: KeyboardEvent) => {
    if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      onTap(zone);
    }
  };
  return (
    <svg viewBox={`${VIEW_BOX.x} ${VIEW_BOX.y} ${VIEW_BOX.width} ${VIEW_BOX.height}`} className={cn('w-full select-none touch-manipulation', className)} role="group" aria-label={`Lip and lower-face diagram: tap a zone to add ${fmt(step)} ${unit}`}>
      {/* Context only: nose base, jaw line and side labels. */}
      <path d="M262,22 C270,0 296,-6 320,2 C344,-6 370,0 378,22 C366,28 350,24 320,26 C290,24 274,28 262,22 Z" className="fill-paper-sunk stroke-line-strong" strokeWidth={2} aria-hidden />
      <path d="M40,120 C40,290 140,400 320,410 C500,400 600,290 600,120" className="fill-none stroke-line" strokeWidth={2} strokeDasharray="6 8" aria-hidden />
      <text x={16} y={-4} className="fill-ink-faint text-[15px]">
        Patient’s right
      </text>
      <text x={624} y={-4} textAnchor="end" className="fill-ink-faint text-[15px]">
        Patient’s left
      </text>

      <defs>
        <clipPath id="tf-side-right">
          <rect x={-100} y={-100} width={420} height={700} />
        </clipPath>
        <clipPath id="tf-side-left">
          <rect x={320} y={-100} width={420} height={700} />
        </clipPath>
      </defs>
      {ORDER.map((zone) => {
        const { shape, kind: zoneKind, side } = SHAPES[zone];
        const usable = zoneKind === kind;
        const amount = amounts[zone] ?? 0;
        const strength = Math.min(1, amount / full);
        const label = `${ZONE_LABELS[zone]}: ${fmt(amount)} ${unit}${usable ? `. Tap to add ${fmt(step)} ${unit}` : ''}`;
        const common = {
          role: 'button',
          tabIndex: usable ? 0 : -1,
          'aria-label': label,
          'aria-disabled': !usable || undefined,
          'data-zone': zone,
          clipPath: side ? `url(#tf-side-${side})` : undefined,
          onClick: usable ? () => onTap(zone) : undefined,
          onKeyDown: usable ? onKey(zone) : undefined,
          className: cn('outline-none', usable ? 'cursor-pointer' : 'pointer-events-none opacity-35', 'group'),
        } as const;
        if (shape.type === 'band') {
          return (
            <g key={zone} {...common}>
              <title>{label}</title>
              <path d={shape.d} fill="none" stroke="transparent" strokeWidth={shape.width + 8} strokeLinecap="round" />
              <path
                d={shape.d}
                fill="none"
                strokeWidth={shape.width}
                strokeLinecap="round"
                className={cn('transition-colors group-hover:stroke-accent/60 group-focus-visible:stroke-ink', amount > 0 ? 'stroke-accent' : 'stroke-accent/30')}
                style={amount > 0 ? { strokeOpacity: 0.45 + 0.55 * strength } : undefined}
              />
            </g>
          );
        }
        if (shape.type === 'dot') {
          return (
            <g key={zone} {...common}>
              <title>{label}</title>
              <circle cx={shape.cx} cy={shape.cy} r={shape.r + 6} fill="transparent" />
              <circle
                cx={shape.cx}
                cy={shape.cy}
                r={shape.r}
                strokeWidth={3}
                className={cn('stroke-accent-strong transition-colors group-hover:fill-accent/60 group-focus-visible:stroke-ink', amount > 0 ? 'fill-accent' : 'fill-paper-raised')}
                style={amount > 0 ? { fillOpacity: 0.45 + 0.55 * strength } : undefined}
              />
            </g>
          );
        }
        const isArea = shape.type === 'area';
        return (
          <g key={zone} {...common}>
            <title>{label}</title>
            <path
              d={shape.d}
              strokeWidth={2}
              className={cn(
                'transition-colors group-focus-visible:stroke-ink group-focus-visible:[stroke-width:4]',
                isArea ? 'fill-accent-soft stroke-accent/40 group-hover:fill-accent/25' : 'fill-paper-sunk stroke-line-strong group-hover:fill-accent/25',
              )}
            />
            {amount > 0 && <path d={shape.d} className="pointer-events-none fill-accent" style={{ fillOpacity: 0.15 + 0.5 * strength }} />}
          </g>
        );
      })}

      {/* The midline between the two sides of each lip, and the lip closure line, drawn over the bodies. */}
      <path d="M320,122 L320,330" className="pointer-events-none stroke-accent/30" strokeWidth={1.5} strokeDasharray="3 4" aria-hidden />
      <path d="M130,205 C220,214 270,210 320,214 C370,210 420,214 510,205" className="pointer-events-none fill-none stroke-accent-strong/70" strokeWidth={2.5} aria-hidden />

      {ORDER.map((zone) => {
        const amount = amounts[zone] ?? 0;
        if (!amount) return null;
        const [x, y] = SHAPES[zone].label;
        const text = fmt(amount);
        const w = 12 + text.length * 9;
        return (
          <g key={`${zone}-label`} className="pointer-events-none" aria-hidden>
            <rect x={x - w / 2} y={y - 13} width={w} height={24} rx={12} className="fill-ink" />
            <text x={x} y={y + 5} textAnchor="middle" className="fill-paper text-[15px] font-semibold">
              {text}
            </text>
          </g>
        );
      })}
    </svg>
  );
}

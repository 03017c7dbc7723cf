import type { KeyboardEvent } from 'react';
import { cn } from '../../../lib/cn';
import { ZONE_LABELS, type ProductKind, type ZoneKey } from '../zones';

type Shape =
  | { type: 'area'; d: string }
  | { type: 'band'; d: string; width: number }
  | { type: 'dot'; cx: number; cy: number; r: number }
  | { type: 'poly'; d: string };

/**
 * The lips drawn as seen when facing the patient: the patient's right is on the viewer's left.
 * Commissures at x 130 and 510, the stomion around y 210, cupid's-bow peaks at x 282 and 358.
 */
const UPPER_OUTLINE = 'M130,205 C175,170 235,110 282,102 C296,100 308,120 320,122 C332,120 344,100 358,102 C405,110 465,170 510,205';
const STOMION_BACK = 'C420,214 370,210 320,214 C270,210 220,214 130,205';
const LOWER_OUTLINE = 'M130,205 C185,285 248,330 320,330 C392,330 455,285 510,205';

const SHAPES: Record<ZoneKey, { kind: ProductKind; shape: Shape; label: [number, number] }> = {
  'upper-body': { kind: 'filler', shape: { type: 'area', d: `${UPPER_OUTLINE} ${STOMION_BACK} Z` }, label: [424, 160] },
  'lower-body': { kind: 'filler', shape: { type: 'area', d: `${LOWER_OUTLINE} ${STOMION_BACK} Z` }, label: [320, 290] },
  'upper-vermilion-border': { kind: 'filler', shape: { type: 'band', d: 'M150,190 C190,158 238,112 276,104 M364,104 C402,112 450,158 490,190', width: 14 }, label: [178, 132] },
  'cupids-bow': { kind: 'filler', shape: { type: 'band', d: 'M278,103 C296,100 308,120 320,122 C332,120 344,100 362,103', width: 14 }, label: [320, 84] },
  'lower-vermilion-border': { kind: 'filler', shape: { type: 'band', d: 'M154,240 C202,298 256,330 320,330 C384,330 438,298 486,240', width: 14 }, label: [462, 304] },
  'philtral-column-right': { kind: 'filler', shape: { type: 'band', d: 'M285,94 L297,30', width: 14 }, label: [254, 58] },
  'philtral-column-left': { kind: 'filler', shape: { type: 'band', d: 'M355,94 L343,30', width: 14 }, label: [386, 58] },
  'wet-dry-border-upper': { kind: 'filler', shape: { type: 'band', d: 'M172,200 C232,194 272,186 320,190 C368,186 408,194 468,200', width: 9 }, label: [230, 178] },
  'wet-dry-border-lower': { kind: 'filler', shape: { type: 'band', d: 'M174,224 C234,240 272,238 320,240 C368,238 406,240 466,224', width: 9 }, label: [410, 256] },
  'oral-commissure-right': { kind: 'filler', shape: { type: 'dot', cx: 130, cy: 206, r: 16 }, label: [96, 176] },
  'oral-commissure-left': { kind: 'filler', shape: { type: 'dot', cx: 510, cy: 206, r: 16 }, label: [544, 176] },
  'dao-right': { kind: 'toxin', shape: { type: 'poly', d: 'M116,248 L152,256 L128,354 L84,342 Z' }, label: [88, 380] },
  'dao-left': { kind: 'toxin', shape: { type: 'poly', d: 'M524,248 L488,256 L512,354 L556,342 Z' }, label: [552, 380] },
};

/** Points inside each zone, clear of its neighbours, in diagram units (for tests and the keyboard focus ring). */
export const ZONE_TARGETS: Record<ZoneKey, [number, number]> = {
  'upper-body': [420, 162],
  'lower-body': [320, 285],
  'upper-vermilion-border': [200, 141],
  'cupids-bow': [300, 109],
  'lower-vermilion-border': [380, 322],
  'philtral-column-right': [291, 62],
  'philtral-column-left': [349, 62],
  'wet-dry-border-upper': [320, 190],
  'wet-dry-border-lower': [320, 240],
  'oral-commissure-right': [130, 206],
  'oral-commissure-left': [510, 206],
  'dao-right': [118, 300],
  'dao-left': [522, 300],
};

/** The drawing's coordinate box. */
export const VIEW_BOX = { x: 0, y: -24, width: 640, height: 440 };

/** Draw order: areas under borders, borders under the corner dots. */
const ORDER: ZoneKey[] = [
  'upper-body',
  'lower-body',
  'wet-dry-border-upper',
  'wet-dry-border-lower',
  'upper-vermilion-border',
  'cupids-bow',
  'lower-vermilion-border',
  'philtral-column-right',
  'philtral-column-left',
  'oral-commissure-right',
  'oral-commissure-left',
  'dao-right',
  'dao-left',
];

const fmt = (n: number) => String(Math.round(n * 100) / 100);

export interface LipDiagramProps {
  /** Zones of this kind can be tapped; the others are dimmed. */
  kind: ProductKind;
  unit: 'mL' | 'U';
  /** Amount per zone of the line being edited. */
  amounts: Partial<Record<ZoneKey, number>>;
  /** The amount that counts as "a lot" for the fill strength (e.g. 1 mL, 5 U). */
  full: number;
  step: number;
  onTap: (zone: ZoneKey) => void;
  className?: string;
}

/** The clickable lip diagram: tap a zone to add one step of the active line's product to it. */
export function LipDiagram({ kind, unit, amounts, full, step, onTap, className }: LipDiagramProps) {
  const onKey = (zone: ZoneKey) => (e: KeyboardEvent) => {
    if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      onTap(zone);
    }
  };
  return (
    <svg viewBox={`${VIEW_BOX.x} ${VIEW_BOX.y} ${VIEW_BOX.width} ${VIEW_BOX.height}`} className={cn('w-full select-none touch-manipulation', className)} role="group" aria-label={`Lip diagram: tap a zone to add ${fmt(step)} ${unit}`}>
      {/* Context only: nose base, jaw line and side labels. */}
      <path d="M262,22 C270,0 296,-6 320,2 C344,-6 370,0 378,22 C366,28 350,24 320,26 C290,24 274,28 262,22 Z" className="fill-paper-sunk stroke-line-strong" strokeWidth={2} aria-hidden />
      <path d="M40,120 C40,290 140,400 320,410 C500,400 600,290 600,120" className="fill-none stroke-line" strokeWidth={2} strokeDasharray="6 8" aria-hidden />
      <text x={16} y={-4} className="fill-ink-faint text-[15px]">
        Patient’s right
      </text>
      <text x={624} y={-4} textAnchor="end" className="fill-ink-faint text-[15px]">
        Patient’s left
      </text>

      {ORDER.map((zone) => {
        const { shape, kind: zoneKind } = SHAPES[zone];
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

      {/* The lip closure line, drawn over the bodies. */}
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

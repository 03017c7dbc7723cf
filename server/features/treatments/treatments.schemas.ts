import { z } from 'zod';
import { Gs1Error, normaliseGtin } from '../../lib/gs1.js';

/**
 * What a product is: hyaluronic-acid filler (measured in mL), neuromodulator toxin (in units) or hyaluronidase, the
 * enzyme that dissolves HA filler (in units; recorded in complication episodes and kept in the emergency kit).
 */
export const PRODUCT_KINDS = ['filler', 'toxin', 'hyaluronidase'] as const;
export type ProductKind = (typeof PRODUCT_KINDS)[number];
/** The kinds a treatment line records into zones of the diagram. */
export type LineKind = Exclude<ProductKind, 'hyaluronidase'>;
export const PRODUCT_UNITS = ['mL', 'U'] as const;
export type ProductUnit = (typeof PRODUCT_UNITS)[number];
/** A filler is always dosed in mL, toxin and hyaluronidase in units; the pair is fixed so a line can never mix them up. */
export const UNIT_OF_KIND: Record<ProductKind, ProductUnit> = { filler: 'mL', toxin: 'U', hyaluronidase: 'U' };
export const PRODUCT_KIND_LABELS: Record<ProductKind, string> = { filler: 'HA filler', toxin: 'Neuromodulator', hyaluronidase: 'Hyaluronidase' };

/**
 * The zones of the lip and lower-face diagram. Left and right are the patient's own sides (on the diagram, the
 * patient's right is drawn on the viewer's left, as when facing the patient).
 */
export const FILLER_ZONES = [
  'upper-vermilion-border-right',
  'upper-vermilion-border-left',
  'lower-vermilion-border-right',
  'lower-vermilion-border-left',
  'upper-body-right',
  'upper-body-left',
  'lower-body-right',
  'lower-body-left',
  'cupids-bow',
  'philtral-column-right',
  'philtral-column-left',
  'wet-dry-border-upper',
  'wet-dry-border-lower',
  'oral-commissure-right',
  'oral-commissure-left',
  'perioral-lines-upper',
  'perioral-lines-lower',
  'marionette-right',
  'marionette-left',
  'pre-jowl-sulcus-right',
  'pre-jowl-sulcus-left',
  'chin',
] as const;
/** Whole-lip zones of records made before the diagram had sides: still read and re-saved, no longer offered. */
export const LEGACY_FILLER_ZONES = ['upper-vermilion-border', 'lower-vermilion-border', 'upper-body', 'lower-body'] as const;
/** Neuromodulator into the lower face: the depressor anguli oris per side, the mentalis, the orbicularis oris. */
export const TOXIN_ZONES = ['dao-right', 'dao-left', 'mentalis', 'orbicularis-oris'] as const;
export const ZONES = [...FILLER_ZONES, ...LEGACY_FILLER_ZONES, ...TOXIN_ZONES] as const;
export type FillerZone = (typeof FILLER_ZONES)[number];
export type ToxinZone = (typeof TOXIN_ZONES)[number];
export type ZoneKey = (typeof ZONES)[number];
/** The zones the diagram offers for each kind. */
export const ZONES_OF_KIND: Record<LineKind, readonly ZoneKey[]> = { filler: FILLER_ZONES, toxin: TOXIN_ZONES };
/** The zones a stored line of each kind may hold (the offered ones and the legacy whole-lip zones). */
export const ACCEPTED_ZONES_OF_KIND: Record<LineKind, readonly ZoneKey[]> = { filler: [...FILLER_ZONES, ...LEGACY_FILLER_ZONES], toxin: TOXIN_ZONES };

export const ZONE_LABELS: Record<ZoneKey, string> = {
  'upper-vermilion-border-right': 'Upper vermilion border (right)',
  'upper-vermilion-border-left': 'Upper vermilion border (left)',
  'lower-vermilion-border-right': 'Lower vermilion border (right)',
  'lower-vermilion-border-left': 'Lower vermilion border (left)',
  'upper-body-right': 'Upper lip body (right)',
  'upper-body-left': 'Upper lip body (left)',
  'lower-body-right': 'Lower lip body (right)',
  'lower-body-left': 'Lower lip body (left)',
  'cupids-bow': "Cupid's bow",
  'philtral-column-right': 'Philtral column (right)',
  'philtral-column-left': 'Philtral column (left)',
  'wet-dry-border-upper': 'Wet–dry border, upper',
  'wet-dry-border-lower': 'Wet–dry border, lower',
  'oral-commissure-right': 'Oral commissure (right)',
  'oral-commissure-left': 'Oral commissure (left)',
  'perioral-lines-upper': 'Perioral lines, upper',
  'perioral-lines-lower': 'Perioral lines, lower',
  'marionette-right': 'Marionette line (right)',
  'marionette-left': 'Marionette line (left)',
  'pre-jowl-sulcus-right': 'Pre-jowl sulcus (right)',
  'pre-jowl-sulcus-left': 'Pre-jowl sulcus (left)',
  chin: 'Chin',
  'upper-vermilion-border': 'Upper vermilion border (both sides)',
  'lower-vermilion-border': 'Lower vermilion border (both sides)',
  'upper-body': 'Upper lip body (both sides)',
  'lower-body': 'Lower lip body (both sides)',
  'dao-right': 'Depressor anguli oris (right)',
  'dao-left': 'Depressor anguli oris (left)',
  mentalis: 'Mentalis',
  'orbicularis-oris': 'Orbicularis oris',
};

export const TECHNIQUES = ['linear-threading', 'serial-puncture', 'bolus', 'fanning', 'vertical-tenting'] as const;
export type Technique = (typeof TECHNIQUES)[number];
export const DEVICES = ['needle', 'cannula'] as const;
export const DEPTHS = ['intradermal', 'subdermal', 'submucosal', 'intramuscular'] as const;
export const ANAESTHETICS = ['none', 'topical', 'lidocaine-in-product', 'dental-block', 'other'] as const;
export const ADVERSE_EVENTS = ['bruising', 'swelling', 'bleeding', 'pain', 'blanching', 'vasovagal', 'other'] as const;

/**
 * Hard limits: anything above is a typing error, not a treatment, and is refused. Unusually high but plausible
 * amounts are allowed with a warning (see `highVolumeMl` in the settings).
 */
export const LIMITS = {
  /** One zone of one line, mL. A filler syringe holds 1 mL (FACTS 17, common practice). */
  fillerPerZoneMl: 2,
  /** One line, mL (five 1 mL syringes of the same product). */
  fillerPerLineMl: 5,
  toxinPerZoneU: 20,
  toxinPerLineU: 50,
  linesPerTreatment: 8,
} as const;

/** Amounts are stored as integer thousandths of the unit so totals add up exactly (0.1 + 0.2 is 0.3 here). */
export const AMOUNT_SCALE = 1000;

/** Lot numbers: printable characters only. Control and format characters (e.g. a scanner's tab or CR) are refused. */
export const lotNumberSchema = z
  .string()
  .max(40, 'Use at most 40 characters for the lot number.')
  .refine((s) => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(s), { message: 'The lot number may contain printable characters only.' })
  .transform((s) => s.trim())
  .refine((s) => s.length > 0, { message: 'Enter the lot number, or leave it out until it can be read from the box.' });

const isRealDate = (y: number, m: number, d: number) => {
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
};

/**
 * Expiry as printed on the box: `YYYY-MM-DD`, or `YYYY-MM` which means the last day of that month
 * (the usual reading of a month-only use-by date; common practice). Normalised to `YYYY-MM-DD`.
 */
export const expiryDateSchema = z
  .string()
  .regex(/^\d{4}-\d{2}(-\d{2})?$/, 'Use the expiry date printed on the box, as YYYY-MM-DD or YYYY-MM.')
  .transform((s, ctx) => {
    const [y, m, d] = s.split('-').map(Number);
    if (m < 1 || m > 12 || (d !== undefined && !isRealDate(y, m, d))) {
      ctx.addIssue({ code: 'custom', message: 'That expiry date does not exist.' });
      return z.NEVER;
    }
    const day = d ?? new Date(Date.UTC(y, m, 0)).getUTCDate();
    return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
  });

const amountSchema = z
  .number({ message: 'Enter the amount as a number.' })
  .finite()
  .positive('Amounts must be above zero; leave a zone out instead of entering 0.')
  .refine((n) => Math.abs(n * 100 - Math.round(n * 100)) < 1e-6, { message: 'Use at most two decimals (e.g. 0.05 mL, 2.5 U).' });

export const zoneDoseSchema = z.object({ zone: z.enum(ZONES, { message: 'Choose a zone of the lip diagram.' }), amount: amountSchema }).strict();

export const treatmentLineSchema = z
  .object({
    productId: z.string().uuid('Choose a product.'),
    /** Repeats the product's unit so a filler line can never be read or written in units (and vice versa). */
    unit: z.enum(PRODUCT_UNITS, { message: 'Unit is mL for fillers and U for toxin.' }),
    lotNumber: lotNumberSchema.nullable().optional(),
    expiryDate: expiryDateSchema.nullable().optional(),
    doses: z.array(zoneDoseSchema).min(1, 'Add the amount for at least one zone.').max(ZONES.length),
    techniques: z.array(z.enum(TECHNIQUES, { message: 'Choose a technique from the list.' })).max(TECHNIQUES.length).default([]),
    device: z.enum(DEVICES, { message: 'Choose needle or cannula.' }).nullable().optional(),
    gauge: z.number().int('Gauge is a whole number.').min(18, 'Gauge between 18G and 34G.').max(34, 'Gauge between 18G and 34G.').nullable().optional(),
    depth: z.enum(DEPTHS, { message: 'Choose a depth from the list.' }).nullable().optional(),
    notes: z.string().max(2000, 'Use at most 2000 characters.').default(''),
  })
  .strict()
  .superRefine((line, ctx) => {
    const seen = new Set<string>();
    line.doses.forEach((d, i) => {
      if (seen.has(d.zone)) ctx.addIssue({ code: 'custom', path: ['doses', i, 'zone'], message: 'Each zone may appear once per line; add the amounts together.' });
      seen.add(d.zone);
    });
    if (new Set(line.techniques).size !== line.techniques.length) ctx.addIssue({ code: 'custom', path: ['techniques'], message: 'List each technique once.' });
  });

export const treatmentInputSchema = z
  .object({
    /** When the treatment was given (UTC ISO); defaults to now. Lots are checked against this day in the clinic's time zone. */
    treatedAt: z.iso.datetime({ offset: true, message: 'Use a date and time like 2026-05-01T10:30:00Z.' }).optional(),
    lines: z.array(treatmentLineSchema).min(1, 'Add at least one product line.').max(LIMITS.linesPerTreatment, `Use at most ${LIMITS.linesPerTreatment} lines.`),
    anaesthetic: z.enum(ANAESTHETICS, { message: 'Choose the anaesthetic used.' }).default('none'),
    anaestheticNotes: z.string().max(500, 'Use at most 500 characters.').default(''),
    adverseEvents: z.array(z.enum(ADVERSE_EVENTS, { message: 'Choose from the list, or "other" and describe it.' })).max(ADVERSE_EVENTS.length).default([]),
    adverseEventNotes: z.string().max(2000, 'Use at most 2000 characters.').default(''),
    notes: z.string().max(4000, 'Use at most 4000 characters.').default(''),
    /** Days until the review reminder; 2–4 weeks (FACTS 17, common practice). */
    reviewAfterDays: z.number().int().min(14, 'The review is 2–4 weeks after treatment (14–28 days).').max(28, 'The review is 2–4 weeks after treatment (14–28 days).').optional(),
    /** Months until the maintenance reminder. */
    maintenanceAfterMonths: z.number().int().min(3, 'Maintenance between 3 and 12 months.').max(12, 'Maintenance between 3 and 12 months.').optional(),
  })
  .strict();

/** A GTIN-8/12/13/14 with a correct GS1 check digit, stored as 14 digits. */
export const gtinSchema = z.string().transform((s, ctx) => {
  try {
    return normaliseGtin(s);
  } catch (e) {
    ctx.addIssue({ code: 'custom', message: e instanceof Gs1Error ? e.message : 'Not a GTIN.' });
    return z.NEVER;
  }
});

/**
 * The name of a product's units as its labelling gives it, e.g. "U (Harlowvale type A)". Units of one neuromodulator
 * are not interchangeable with another's (product labelling, FACTS 28), so every product in units has its own label.
 */
const unitLabelSchema = z.string().trim().min(1, 'Name the units as the product labelling does.').max(40, 'Use at most 40 characters.');

export const productInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the product a name.').max(120, 'Use at most 120 characters.'),
    kind: z.enum(PRODUCT_KINDS, { message: 'Choose filler, neuromodulator or hyaluronidase.' }),
    unit: z.enum(PRODUCT_UNITS, { message: 'Choose mL or U.' }),
    unitLabel: unitLabelSchema.nullable().default(null),
    manufacturer: z.string().trim().min(1, 'Name the manufacturer.').max(120, 'Use at most 120 characters.'),
    /** What one pack holds, e.g. 1 (mL syringe) or 100 (U vial). */
    packSize: z.number().positive('Pack size must be above zero.').max(100_000).nullable().default(null),
    gtin: gtinSchema.nullable().default(null),
    active: z.boolean().default(true),
  })
  .strict()
  .superRefine((p, ctx) => {
    if (UNIT_OF_KIND[p.kind] !== p.unit) ctx.addIssue({ code: 'custom', path: ['unit'], message: 'Fillers are measured in mL; neuromodulator and hyaluronidase in units (U).' });
    if (p.unit === 'U' && !p.unitLabel) ctx.addIssue({ code: 'custom', path: ['unitLabel'], message: "Name this product's units as its labelling does: units of one product are not interchangeable with another's." });
  });

export const productUpdateSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the product a name.').max(120, 'Use at most 120 characters.').optional(),
    manufacturer: z.string().trim().min(1, 'Name the manufacturer.').max(120, 'Use at most 120 characters.').optional(),
    unitLabel: unitLabelSchema.nullable().optional(),
    packSize: z.number().positive('Pack size must be above zero.').max(100_000).nullable().optional(),
    gtin: gtinSchema.nullable().optional(),
    active: z.boolean().optional(),
  })
  .strict();

export const productListQuerySchema = z.object({ all: z.enum(['0', '1']).optional() }).strict();

/** Goals a patient may bring to a consultation (DESIGN §1). */
export const CONSULTATION_GOALS = ['border-definition', 'more-volume', 'cupids-bow-definition', 'eversion', 'corner-support', 'symmetry', 'hydration'] as const;
export const TARGET_RATIOS = ['1:1', '1:1.6', '1:2', 'custom'] as const;

export const planStageSchema = z
  .object({
    label: z.string().trim().min(1, 'Describe the stage, e.g. "1 mL today".').max(200, 'Use at most 200 characters.'),
    plannedDate: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD.').nullable().default(null),
    plannedAmountMl: z.number().positive().max(LIMITS.fillerPerLineMl, `At most ${LIMITS.fillerPerLineMl} mL per stage.`).nullable().default(null),
  })
  .strict();

export const consultationInputSchema = z
  .object({
    goals: z.array(z.enum(CONSULTATION_GOALS, { message: 'Choose goals from the list.' })).max(CONSULTATION_GOALS.length).default([]),
    goalsText: z.string().max(4000, 'Use at most 4000 characters.').default(''),
    targetRatio: z.enum(TARGET_RATIOS, { message: 'Choose 1:1, 1:1.6, 1:2 or custom.' }).nullable().default(null),
    /** Lower lip height per upper lip height for a custom target, e.g. 1.4 for 1:1.4. */
    customRatio: z.number().min(0.5, 'A ratio between 1:0.5 and 1:3.').max(3, 'A ratio between 1:0.5 and 1:3.').nullable().default(null),
    expectations: z.string().max(4000, 'Use at most 4000 characters.').default(''),
    plan: z.array(planStageSchema).max(8, 'Use at most 8 stages.').default([]),
  })
  .strict()
  .superRefine((c, ctx) => {
    if (c.targetRatio === 'custom' && c.customRatio === null) ctx.addIssue({ code: 'custom', path: ['customRatio'], message: 'Enter the custom ratio.' });
    if (c.targetRatio !== 'custom' && c.customRatio !== null) ctx.addIssue({ code: 'custom', path: ['customRatio'], message: 'A custom ratio goes with the "custom" target only.' });
    const hasGoal = c.goals.length > 0 || c.goalsText.trim().length > 0;
    if (!hasGoal) ctx.addIssue({ code: 'custom', path: ['goals'], message: "Record at least one of the patient's goals." });
  });

export const acknowledgeFlagSchema = z
  .object({
    questionId: z.string().min(1).max(80),
    note: z.string().trim().min(3, 'Write a short note on how you weighed this answer.').max(2000, 'Use at most 2000 characters.'),
  })
  .strict();

export type TreatmentInput = z.input<typeof treatmentInputSchema>;
export type TreatmentLineInput = z.input<typeof treatmentLineSchema>;
export type ProductInput = z.input<typeof productInputSchema>;
export type ConsultationInput = z.input<typeof consultationInputSchema>;

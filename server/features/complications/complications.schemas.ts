import { z } from 'zod';
import { expiryDateSchema, lotNumberSchema } from '../treatments/treatments.schemas.js';

/**
 * What the clinician saw. Signs of a possible vascular occlusion (blanching, livedo, dusky colour, pain out of
 * proportion, slow capillary refill, a change in vision) come first; the list records, it does not diagnose
 * (FACTS 19, published labelling and consensus guidance).
 */
export const COMPLICATION_SIGNS = [
  'blanching',
  'livedo',
  'dusky-colour',
  'pain-out-of-proportion',
  'slow-capillary-refill',
  'visual-change',
  'swelling',
  'bruising',
  'nodule',
  'signs-of-infection',
  'allergic-reaction',
  'other',
] as const;
export const SIGN_LABELS: Record<(typeof COMPLICATION_SIGNS)[number], string> = {
  blanching: 'Blanching',
  livedo: 'Livedo / mottling',
  'dusky-colour': 'Dusky or blue-grey colour',
  'pain-out-of-proportion': 'Pain out of proportion',
  'slow-capillary-refill': 'Slow capillary refill',
  'visual-change': 'Change in vision',
  swelling: 'Swelling',
  bruising: 'Bruising',
  nodule: 'Nodule or lump',
  'signs-of-infection': 'Signs of infection',
  'allergic-reaction': 'Allergic reaction',
  other: 'Other',
};

/** What was done. The record keeps what the clinician gave; it never suggests an amount. */
export const ACTION_KINDS = ['hyaluronidase', 'medication', 'referral', 'other-care'] as const;
export const ACTION_LABELS: Record<(typeof ACTION_KINDS)[number], string> = {
  hyaluronidase: 'Hyaluronidase',
  medication: 'Medication',
  referral: 'Referral',
  'other-care': 'Other care',
};

export const OUTCOMES = ['ongoing', 'improving', 'resolved', 'resolved-with-sequelae', 'referred'] as const;
export const OUTCOME_LABELS: Record<(typeof OUTCOMES)[number], string> = {
  ongoing: 'Ongoing',
  improving: 'Improving',
  resolved: 'Resolved',
  'resolved-with-sequelae': 'Resolved with lasting effects',
  referred: 'Referred for care elsewhere',
};

const instant = z.iso.datetime({ offset: true, message: 'Use a date and time like 2026-05-01T10:30:00Z.' });
const text = (max: number) => z.string().max(max, `Use at most ${max} characters.`);

export const startEpisodeSchema = z
  .object({
    onsetAt: instant.optional(),
    signs: z.array(z.enum(COMPLICATION_SIGNS, { message: 'Choose signs from the list, or "other" and describe it.' })).max(COMPLICATION_SIGNS.length).default([]),
    signsNotes: text(4000).default(''),
  })
  .strict();

export const updateEpisodeSchema = z
  .object({
    onsetAt: instant.optional(),
    signs: z.array(z.enum(COMPLICATION_SIGNS, { message: 'Choose signs from the list, or "other" and describe it.' })).max(COMPLICATION_SIGNS.length).optional(),
    signsNotes: text(4000).optional(),
    outcome: z.enum(OUTCOMES, { message: 'Choose an outcome from the list.' }).nullable().optional(),
    outcomeNotes: text(4000).optional(),
  })
  .strict();

export const actionSchema = z
  .object({
    at: instant,
    kind: z.enum(ACTION_KINDS, { message: 'Choose hyaluronidase, medication, referral or other care.' }),
    description: text(2000).default(''),
    productId: z.string().uuid('Choose the hyaluronidase product.').nullable().default(null),
    lotNumber: lotNumberSchema.nullable().default(null),
    expiryDate: expiryDateSchema.nullable().default(null),
    /** Units given, in the product's own units. */
    amount: z.number().positive('The amount is above zero.').max(100_000).nullable().default(null),
    /** Vials taken from stock for this action (0 when an opened vial was used). */
    packsUsed: z.number().int().min(0).max(20).default(1),
  })
  .strict()
  .superRefine((a, ctx) => {
    if (a.kind === 'hyaluronidase') {
      if (!a.productId) ctx.addIssue({ code: 'custom', path: ['productId'], message: 'Choose the hyaluronidase product.' });
      if (!a.lotNumber) ctx.addIssue({ code: 'custom', path: ['lotNumber'], message: 'Record the lot number from the vial.' });
      if (a.amount === null) ctx.addIssue({ code: 'custom', path: ['amount'], message: 'Record the units given.' });
    } else {
      if (!a.description.trim()) ctx.addIssue({ code: 'custom', path: ['description'], message: 'Describe what was done.' });
      if (a.productId || a.lotNumber || a.amount !== null) ctx.addIssue({ code: 'custom', path: ['productId'], message: 'Product, lot and units go with a hyaluronidase entry.' });
    }
  });

export const followUpSchema = z
  .object({
    at: instant,
    notes: text(4000).default(''),
    /** Books a follow-up visit at that time, where photos of the episode are taken. */
    bookVisit: z.boolean().default(true),
  })
  .strict();

export type StartEpisodeInput = z.input<typeof startEpisodeSchema>;
export type UpdateEpisodeInput = z.input<typeof updateEpisodeSchema>;
export type ActionInput = z.input<typeof actionSchema>;
export type FollowUpInput = z.input<typeof followUpSchema>;
export type ComplicationSign = (typeof COMPLICATION_SIGNS)[number];
export type ActionKind = (typeof ACTION_KINDS)[number];
export type Outcome = (typeof OUTCOMES)[number];

import { z } from 'zod';

const KINDS = ['treatment', 'photography', 'showcase', 'screening'] as const;
const CHANNELS = ['clinic-website', 'social-media', 'print', 'professional-education'] as const;

export const questionSchema = z
  .object({
    id: z.string().regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'Use lowercase letters, digits and dashes (at most 40).'),
    type: z.enum(['yes-no', 'text', 'choice']),
    label: z.string().trim().min(1, 'Enter the question.').max(500),
    help: z.string().trim().max(1000).optional(),
    options: z.array(z.string().trim().min(1).max(120)).min(2, 'A choice needs at least two options.').max(12).optional(),
    required: z.boolean().default(true),
    flagWhen: z.array(z.string().trim().min(1).max(120)).max(12).optional(),
  })
  .strict()
  .superRefine((q, ctx) => {
    if (q.type === 'choice' && !q.options) ctx.addIssue({ code: 'custom', path: ['options'], message: 'A choice question needs options.' });
    if (q.type !== 'choice' && q.options) ctx.addIssue({ code: 'custom', path: ['options'], message: 'Only a choice question has options.' });
    if (q.options && new Set(q.options).size !== q.options.length) ctx.addIssue({ code: 'custom', path: ['options'], message: 'Options must differ.' });
    const valid = q.type === 'yes-no' ? ['yes', 'no'] : q.type === 'choice' ? (q.options ?? []) : [];
    for (const [i, a] of (q.flagWhen ?? []).entries()) {
      if (!valid.includes(a)) {
        ctx.addIssue({ code: 'custom', path: ['flagWhen', i], message: q.type === 'text' ? 'A text answer cannot be flagged.' : `"${a}" is not a possible answer.` });
      }
    }
  });

const contentFields = {
  title: z.string().trim().min(1, 'Enter a title.').max(200, 'Use at most 200 characters.'),
  body: z.string().max(50_000, 'The text is too long (at most 50,000 characters).'),
  questions: z.array(questionSchema).max(40).default([]),
  channels: z.array(z.enum(CHANNELS)).max(CHANNELS.length).default([]),
};

function checkContent(t: { kind?: string; questions?: { id: string }[]; channels?: string[] }, ctx: z.RefinementCtx) {
  const ids = (t.questions ?? []).map((q) => q.id);
  const dup = ids.find((id, i) => ids.indexOf(id) !== i);
  if (dup) ctx.addIssue({ code: 'custom', path: ['questions'], message: `Question id "${dup}" is used twice.` });
  if (t.channels && new Set(t.channels).size !== t.channels.length) ctx.addIssue({ code: 'custom', path: ['channels'], message: 'A channel is listed twice.' });
  if (t.kind && t.channels) {
    if (t.kind === 'showcase' && t.channels.length === 0) ctx.addIssue({ code: 'custom', path: ['channels'], message: 'A showcase consent offers at least one channel.' });
    if (t.kind !== 'showcase' && t.channels.length > 0) ctx.addIssue({ code: 'custom', path: ['channels'], message: 'Only a showcase consent has channels.' });
  }
}

export const createTemplateSchema = z
  .object({ kind: z.enum(KINDS), ...contentFields })
  .strict()
  .superRefine(checkContent);

export const updateTemplateSchema = z
  .object({ title: contentFields.title.optional(), body: contentFields.body.optional(), questions: z.array(questionSchema).max(40).optional(), channels: z.array(z.enum(CHANNELS)).max(4).optional() })
  .strict()
  .superRefine(checkContent);

export const templateListQuerySchema = z
  .object({
    kind: z.enum(KINDS).optional(),
    status: z.enum(['draft', 'published', 'retired']).optional(),
  })
  .strict();

export type TemplateQuestionInput = z.input<typeof questionSchema>;
export type CreateTemplateInput = z.input<typeof createTemplateSchema>;
export type UpdateTemplateInput = z.input<typeof updateTemplateSchema>;

import type { DataSource, EntityManager } from 'typeorm';
import { ConsentTemplate, type ConsentKind, type ShowcaseChannel, type TemplateQuestion } from '../../entities/consent-template.js';
import { newId } from '../../lib/time.js';
import { templateSha256 } from './templates.service.js';

/**
 * The demo clinic's forms, written for the invented clinic "Linden Row Aesthetics". They are examples
 * for a demo, not legal or clinical advice: a real clinic adapts them under local law and professional
 * guidance. Sources behind the content: GDPR Art. 7 and Recital 32 (separate, unticked, withdrawable
 * consent); 45 CFR 164.508 (elements of an authorisation for marketing use); tiered clinical photography
 * consent (common practice); product labelling for contraindications and serious complications of
 * hyaluronic-acid filler.
 */
export interface DemoTemplate {
  kind: ConsentKind;
  title: string;
  body: string;
  questions: TemplateQuestion[];
  channels: ShowcaseChannel[];
}

const yesNo = (id: string, label: string, flagWhen?: ('yes' | 'no')[], help?: string): TemplateQuestion => ({
  id,
  type: 'yes-no',
  label,
  required: true,
  ...(help ? { help } : {}),
  ...(flagWhen ? { flagWhen } : {}),
});

const TREATMENT: DemoTemplate = {
  kind: 'treatment',
  title: 'Consent to lip treatment with hyaluronic-acid filler',
  body: `Linden Row Aesthetics offers lip enhancement with a hyaluronic-acid (HA) dermal filler. Please read this page carefully. Your practitioner will go through it with you and answer your questions before anything is injected.

## What the treatment involves

A gel of hyaluronic acid, a sugar that occurs naturally in the skin, is injected into and around the lips with a fine needle or a blunt cannula. Most products contain a local anaesthetic (lidocaine) to make the injections more comfortable. The amount is measured in millilitres; a first treatment usually uses about half to one millilitre.

The result shows straight away but is blurred by swelling for the first days. It usually settles by two weeks, when we invite you back for a review. The filler is broken down by the body over time; most people keep a visible result for roughly six to nine months. Results differ from person to person and cannot be guaranteed. Sometimes a small top-up is needed to reach the agreed look.

## Common effects (expected, and usually settle within days to two weeks)

- **Swelling**, which may be uneven and is often most noticeable the morning after treatment
- **Bruising** at injection points
- **Tenderness**, redness and small marks where the needle went in

## Less common effects

- **Asymmetry**: the two sides may look or settle differently; this can often be corrected at review
- **Lumps or firmness** that you can feel or see; most soften with time or can be treated
- **Infection** at an injection point
- **A cold-sore flare**: if you have had cold sores, the treatment can trigger one
- An **allergic reaction** to the filler or to the anaesthetic

## Rare but serious risks

- Filler can enter or press on a blood vessel and **block the blood supply (vascular occlusion)**. Without prompt treatment this can cause **loss of skin and tissue** and scarring.
- Very rarely, a blockage can affect the blood supply to the eye and cause **partial or complete loss of vision**, which may be permanent, or affect the brain.

The clinic keeps hyaluronidase (an enzyme that dissolves HA filler) on site and follows a written complication protocol. **Contact us straight away, day or night, if you notice severe or increasing pain, skin that turns white, grey, blue or mottled, or any change in your vision.** If you cannot reach us and your eyesight changes, go to an emergency department.

## Alternatives

You may choose not to have treatment, to wait, or to ask about other options. Saying no does not affect the care you receive from us.

## Aftercare

- Avoid touching, pressing or massaging your lips for the first day unless your practitioner asks you to.
- Leave lipstick and lip products off for 12 hours.
- For 24 hours avoid strenuous exercise, saunas and hot baths, and alcohol.
- A cold pack wrapped in a cloth eases swelling; sleep with your head raised on the first night.
- Avoid dental treatment for two weeks where you can.
- Come back for your review at about two weeks so we can check the result.

Your treatment is carried out by a suitably qualified practitioner registered under local regulation. You may stop the treatment at any time, including after it has started.`,
  questions: [
    yesNo('read-and-understood', 'I have read this information, it has been explained to me, and I have had the chance to ask questions.', ['no']),
    yesNo('results-vary', 'I understand that results vary, are not permanent, and that a top-up may be needed.', ['no']),
    yesNo('serious-risks', 'I understand the rare serious risks, including vascular occlusion with tissue loss or loss of vision, and know how to reach the clinic urgently.', ['no']),
    yesNo('aftercare', 'I agree to follow the aftercare advice and to contact the clinic if anything worries me.', ['no']),
  ],
  channels: [],
};

const PHOTOGRAPHY: DemoTemplate = {
  kind: 'photography',
  title: 'Consent to clinical photography',
  body: `Linden Row Aesthetics takes standard photographs of your face and lips before treatment, at review and at later visits. Taking the same views each time lets you and your practitioner judge the result honestly.

## How your photographs are kept

- They are part of your clinical record and are stored securely, without location or camera details.
- Only the clinic team involved in your care can open them, and every access is logged.
- They are kept for as long as the clinic must keep clinical records under local law.

## Choose how your photographs may be used

Please answer each level separately. Nothing is chosen for you.

1. **Clinical record**: photographs kept in your own record to plan and document your treatment.
2. **Teaching**: shown to other health professionals in training, without your name.
3. **Publication**: included in professional journals, books or conference talks, without your name. Your face may still be recognisable.

Using your photographs to promote the clinic (for example on our website or social media) is a separate choice with its own form, the showcase consent.

## Changing your mind

You may withdraw your consent for teaching or publication at any time by telling reception, phoning or e-mailing us. We will stop any new use. Material that has already been printed or published cannot always be recalled. Photographs already in your clinical record stay there, because the law requires us to keep a complete record.`,
  questions: [
    yesNo('clinical-record', 'I agree to clinical photographs being taken and kept in my clinical record.', ['no'], 'If you answer no, your practitioner will talk with you about treating without photographs.'),
    yesNo('teaching', 'I agree to my photographs being used for teaching health professionals, without my name.'),
    yesNo('publication', 'I agree to my photographs being published in professional journals, books or talks, without my name.'),
  ],
  channels: [],
};

const SHOWCASE: DemoTemplate = {
  kind: 'showcase',
  title: 'Showcase consent: showing my results',
  body: `With your permission, Linden Row Aesthetics would like to show photographs of your treatment results (for example a before-and-after comparison) to people who are thinking about treatment. This form asks for that permission. It is entirely optional.

## What this permission covers

- **What**: photographs and comparisons of your face and lips taken at this clinic, chosen by the clinic from your visits.
- **Who will use them**: Linden Row Aesthetics only. We will not sell them or give them to anyone else to use for their own purposes.
- **Why**: to show examples of our work, which is marketing.
- **Where**: only in the places you tick below. Nothing is ticked for you.
- **How much of your face**: you choose whether your whole face may be shown or only a close crop of your lips.
- **Your name**: it is never shown with your photographs.
- **No payment**: you will not be paid and nobody pays the clinic for using your photographs.

## How long it lasts

This permission ends **three years after the date you sign**, unless you withdraw it sooner. After that we will ask again or stop using the photographs.

## Your right to withdraw

You can withdraw this permission **at any time**, as easily as you gave it: tell reception, phone or e-mail us. We will confirm in writing, stop any new use at once, and remove the photographs from our website and social media accounts. Printed material that has already been handed out cannot be recalled. Withdrawing does not affect any earlier lawful use.

## Your treatment does not depend on this

Whether you sign this form or not makes no difference to your care or to the price of your treatment.`,
  questions: [
    yesNo('understand-online', 'I understand that images shared online can be copied by others, and copies may stay visible elsewhere after the clinic removes them.'),
  ],
  channels: ['clinic-website', 'social-media', 'print', 'professional-education'],
};

const SCREENING: DemoTemplate = {
  kind: 'screening',
  title: 'Health questions before lip filler',
  body: `Please answer these questions honestly. They help your practitioner decide whether lip filler is safe for you today.

A **yes** does not necessarily mean you cannot be treated: your practitioner will review each answer with you before treatment and may suggest waiting or a different approach. Your answers are kept in your clinical record.`,
  questions: [
    yesNo('under-18', 'Are you under 18 years old?', ['yes']),
    yesNo('pregnant-breastfeeding', 'Are you pregnant, trying to become pregnant, or breastfeeding?', ['yes']),
    yesNo('infection-at-site', 'Do you have a cold sore, spots, a rash or any infection on or around your lips today?', ['yes']),
    yesNo('cold-sore-history', 'Do you get cold sores?', ['yes'], 'Your practitioner may suggest an antiviral medicine before treatment.'),
    yesNo('allergy-filler-anaesthetic', 'Have you ever reacted badly or been allergic to hyaluronic-acid filler, lidocaine or another local anaesthetic?', ['yes']),
    yesNo('blood-thinners', 'Do you take blood-thinning medicine, aspirin or anti-inflammatory painkillers, or supplements such as fish oil, vitamin E or ginkgo?', ['yes']),
    yesNo('autoimmune-immunosuppression', 'Do you have an autoimmune condition, or take medicines that lower your immune defences?', ['yes']),
    yesNo('dental-work', 'Have you had dental treatment in the last two weeks, or is any planned in the next two weeks?', ['yes']),
    yesNo('vaccination', 'Have you had a vaccination in the last two weeks, or is one planned in the next two weeks?', ['yes']),
    yesNo('permanent-filler', 'Have you ever had permanent or semi-permanent filler, or an implant, in your lips?', ['yes']),
    {
      id: 'previous-lip-filler',
      type: 'choice',
      label: 'When did you last have filler in your lips?',
      options: ['Never', 'More than six months ago', 'Within the last six months'],
      required: true,
      flagWhen: ['Within the last six months'],
    },
    { id: 'medicines', type: 'text', label: 'Please list any medicines you take regularly (or leave blank).', required: false },
    { id: 'other-allergies', type: 'text', label: 'Please list any other allergies (or leave blank).', required: false },
  ],
  channels: [],
};

export const DEMO_TEMPLATES: DemoTemplate[] = [TREATMENT, PHOTOGRAPHY, SHOWCASE, SCREENING];

/** Inserts the demo forms as published version 1, authored by `adminId`. */
export async function insertDemoTemplates(db: DataSource | EntityManager, adminId: string, now: string): Promise<ConsentTemplate[]> {
  const rows = DEMO_TEMPLATES.map((d) => {
    const row = db.getRepository(ConsentTemplate).create({
      id: newId(),
      familyId: newId(),
      kind: d.kind,
      version: 1,
      title: d.title,
      body: d.body,
      questions: JSON.stringify(d.questions),
      channels: JSON.stringify(d.channels),
      status: 'published',
      sha256: null,
      createdById: adminId,
      createdAt: now,
      updatedAt: now,
      publishedAt: now,
      publishedById: adminId,
      retiredAt: null,
      retiredById: null,
    });
    row.sha256 = templateSha256(row);
    return row;
  });
  for (const row of rows) await db.getRepository(ConsentTemplate).insert(row);
  return rows;
}

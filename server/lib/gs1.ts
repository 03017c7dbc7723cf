/**
 * GS1 element strings as printed in the DataMatrix or GS1-128 code on a syringe or vial label: the GTIN (AI 01),
 * expiry date (AI 17), batch/lot (AI 10) and serial number (AI 21), per the GS1 General Specifications
 * (section 3.4 for these AIs, section 7.8 for FNC1 as the separator of variable-length fields, section 7.9 for the
 * GTIN check digit, section 7.12 for the century of a YYMMDD date; section numbers from memory).
 *
 * Dependency-free on purpose: the client parses what the camera reads, the server checks GTINs and parses a scanned
 * string again, both with this one module. Written by hand because the parsing is small and the npm parsers for it
 * are neither well known nor agree on DD = 00 and the century window.
 */

/** The separator that stands for FNC1 inside an element string (ASCII 29, "group separator"). */
export const GS = '\u001d';

/** Symbology identifiers (ISO/IEC 15424) that announce GS1 data: DataMatrix, GS1-128, QR, DataBar, DotCode. */
const GS1_SYMBOLOGY_IDS = new Set([']d2', ']C1', ']Q3', ']e0', ']J1']);
/** EAN-13 and UPC-A (their data is a GTIN-13 or GTIN-12). */
const EAN_SYMBOLOGY_IDS = new Set([']E0', ']E3']);
/** Any other symbology identifier: data that is not GS1. */
const PLAIN_SYMBOLOGY_ID = /^\][A-Za-z][0-9A-Za-z]/;

export type Gs1ErrorCode = 'NOT_GS1' | 'BAD_CHECK_DIGIT' | 'BAD_DATE' | 'BAD_FIELD' | 'UNKNOWN_AI' | 'TRUNCATED';

export class Gs1Error extends Error {
  constructor(
    readonly code: Gs1ErrorCode,
    message: string,
    readonly ai?: string,
  ) {
    super(message);
  }
}

interface AiSpec {
  title: string;
  /** Fixed data length, or the maximum of a variable-length field. */
  length: number;
  fixed: boolean;
  kind: 'numeric' | 'alphanumeric' | 'date';
}

/** The AIs a medical-device label carries (GS1 General Specifications, section 3.2 AI table). */
const AIS: Record<string, AiSpec> = {
  '00': { title: 'SSCC', length: 18, fixed: true, kind: 'numeric' },
  '01': { title: 'GTIN', length: 14, fixed: true, kind: 'numeric' },
  '02': { title: 'Contained GTIN', length: 14, fixed: true, kind: 'numeric' },
  '10': { title: 'Batch/lot', length: 20, fixed: false, kind: 'alphanumeric' },
  '11': { title: 'Production date', length: 6, fixed: true, kind: 'date' },
  '13': { title: 'Packaging date', length: 6, fixed: true, kind: 'date' },
  '15': { title: 'Best before date', length: 6, fixed: true, kind: 'date' },
  '16': { title: 'Sell by date', length: 6, fixed: true, kind: 'date' },
  '17': { title: 'Expiry date', length: 6, fixed: true, kind: 'date' },
  '20': { title: 'Variant', length: 2, fixed: true, kind: 'numeric' },
  '21': { title: 'Serial number', length: 20, fixed: false, kind: 'alphanumeric' },
  '30': { title: 'Count', length: 8, fixed: false, kind: 'numeric' },
  '37': { title: 'Count of trade items', length: 8, fixed: false, kind: 'numeric' },
  '240': { title: 'Additional product id', length: 30, fixed: false, kind: 'alphanumeric' },
  '241': { title: 'Customer part number', length: 30, fixed: false, kind: 'alphanumeric' },
};

/**
 * How many digits an AI has, from its first two (the AI length rule of the General Specifications, section 3.2):
 * 00–22, 30, 37 and 90–99 are two-digit AIs; 23–29 and 40–49 three-digit; 31–36, 39 and 70–89 four-digit.
 */
function aiLength(first2: string): number {
  const n = Number(first2);
  if (n <= 22 || n === 30 || n === 37 || n >= 90) return 2;
  if ((n >= 23 && n <= 29) || (n >= 40 && n <= 49)) return 3;
  return 4;
}

/**
 * AIs whose data has a predefined length even when this parser does not know them (General Specifications,
 * figure 7.8.5-2, from memory): their data is never followed by FNC1.
 */
const PREDEFINED_LENGTH: Record<string, number> = { '00': 18, '01': 14, '02': 14, '03': 14, '04': 16, '11': 6, '12': 6, '13': 6, '14': 6, '15': 6, '16': 6, '17': 6, '18': 6, '19': 6, '20': 2, '31': 6, '32': 6, '33': 6, '34': 6, '35': 6, '36': 6, '41': 13 };

/** The 82 characters GS1 allows in alphanumeric fields (General Specifications, figure 7.11-1). */
const CSET82 = /^[!"%&'()*+,\-./0-9:;<=>?A-Z_a-z]*$/;

/**
 * The check digit of a GTIN (any length) from its other digits: weights 3 and 1 alternately from the right,
 * check = (10 − sum mod 10) mod 10 (General Specifications, section 7.9.1).
 */
export function gtinCheckDigit(digitsWithoutCheck: string): number {
  if (!/^\d+$/.test(digitsWithoutCheck)) throw new Gs1Error('BAD_FIELD', 'A GTIN has digits only.', '01');
  let sum = 0;
  for (let i = 0; i < digitsWithoutCheck.length; i++) {
    const digit = Number(digitsWithoutCheck[digitsWithoutCheck.length - 1 - i]);
    sum += digit * (i % 2 === 0 ? 3 : 1);
  }
  return (10 - (sum % 10)) % 10;
}

/**
 * A GTIN-8, -12, -13 or -14 as the 14-digit form the element string and the catalogue use (left-padded with zeros),
 * or a `Gs1Error` when it is not one or its check digit is wrong.
 */
export function normaliseGtin(input: string): string {
  const digits = input.replace(/[\s-]/g, '');
  if (!/^\d+$/.test(digits) || ![8, 12, 13, 14].includes(digits.length)) {
    throw new Gs1Error('BAD_FIELD', 'A GTIN has 8, 12, 13 or 14 digits.', '01');
  }
  const gtin = digits.padStart(14, '0');
  const expected = gtinCheckDigit(gtin.slice(0, 13));
  if (expected !== Number(gtin[13])) {
    throw new Gs1Error('BAD_CHECK_DIGIT', `The GTIN's check digit is wrong: ${gtin.slice(0, 13)} needs ${expected}, not ${gtin[13]}. Check the digits.`, '01');
  }
  return gtin;
}

export function isValidGtin(input: string): boolean {
  try {
    normaliseGtin(input);
    return true;
  } catch {
    return false;
  }
}

/**
 * A YYMMDD date as YYYY-MM-DD. DD = 00 means the last day of that month (General Specifications, section 3.4.7).
 * The century is the one that puts the year within 49 years back and 50 years ahead of `today`
 * (General Specifications, section 7.12).
 */
export function gs1Date(yymmdd: string, today: Date = new Date()): string {
  if (!/^\d{6}$/.test(yymmdd)) throw new Gs1Error('BAD_DATE', `"${yymmdd}" is not a YYMMDD date.`);
  const yy = Number(yymmdd.slice(0, 2));
  const mm = Number(yymmdd.slice(2, 4));
  const dd = Number(yymmdd.slice(4, 6));
  const current = today.getUTCFullYear();
  const diff = yy - (current % 100);
  const century = Math.floor(current / 100) * 100 + (diff >= 51 ? -100 : diff <= -50 ? 100 : 0);
  const year = century + yy;
  if (mm < 1 || mm > 12) throw new Gs1Error('BAD_DATE', `${yymmdd} has no month ${mm}.`);
  const lastDay = new Date(Date.UTC(year, mm, 0)).getUTCDate();
  if (dd > lastDay) throw new Gs1Error('BAD_DATE', `${yymmdd}: that month has no day ${dd}.`);
  const day = dd === 0 ? lastDay : dd;
  return `${year}-${String(mm).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
}

export interface Gs1Element {
  ai: string;
  title: string;
  value: string;
}

/** What a label's element string says. Dates are YYYY-MM-DD; the GTIN is the 14-digit form. */
export interface Gs1Data {
  gtin: string | null;
  expiryDate: string | null;
  lotNumber: string | null;
  serialNumber: string | null;
  productionDate: string | null;
  /** Every element in the order read, the ones not named above included. */
  elements: Gs1Element[];
}

function checkValue(ai: string, spec: AiSpec | undefined, value: string): void {
  const title = spec?.title ?? `AI (${ai})`;
  if (!value.length) throw new Gs1Error('BAD_FIELD', `${title} (${ai}) is empty.`, ai);
  if (!spec) return;
  if (spec.fixed && value.length !== spec.length) throw new Gs1Error('TRUNCATED', `${title} (${ai}) needs ${spec.length} characters, got ${value.length}.`, ai);
  if (!spec.fixed && value.length > spec.length) throw new Gs1Error('BAD_FIELD', `${title} (${ai}) has at most ${spec.length} characters, got ${value.length}. A separator may be missing.`, ai);
  if ((spec.kind === 'numeric' || spec.kind === 'date') && !/^\d+$/.test(value)) throw new Gs1Error('BAD_FIELD', `${title} (${ai}) has digits only.`, ai);
  if (spec.kind === 'alphanumeric' && !CSET82.test(value)) throw new Gs1Error('BAD_FIELD', `${title} (${ai}) has characters GS1 does not allow.`, ai);
}

/** Splits the parentheses form "(01)0950…(17)2609 00(10)AB-12" into elements. */
function splitBracketed(s: string): [string, string][] {
  const out: [string, string][] = [];
  const re = /\((\d{2,4})\)([^(]*)/gy;
  let m: RegExpExecArray | null;
  let end = 0;
  while ((m = re.exec(s))) {
    out.push([m[1], m[2].trim()]);
    end = re.lastIndex;
  }
  if (end !== s.length) throw new Gs1Error('NOT_GS1', 'This is not a GS1 element string: after "(" must come an AI of 2–4 digits.');
  return out;
}

/** Splits the raw form (FNC1 as GS between variable-length fields) into elements. */
function splitRaw(s: string): [string, string][] {
  const out: [string, string][] = [];
  let i = 0;
  while (i < s.length) {
    if (s[i] === GS) {
      i++;
      continue;
    }
    const first2 = s.slice(i, i + 2);
    if (!/^\d{2}$/.test(first2)) throw new Gs1Error('NOT_GS1', 'This is not a GS1 element string: each field starts with a numeric AI.');
    const ai = s.slice(i, i + aiLength(first2));
    if (!/^\d+$/.test(ai) || ai.length < aiLength(first2)) throw new Gs1Error('TRUNCATED', 'The code ends inside an AI.');
    i += ai.length;
    const spec = AIS[ai];
    const fixed = spec?.fixed ? spec.length : PREDEFINED_LENGTH[first2];
    let value: string;
    if (fixed !== undefined) {
      value = s.slice(i, i + fixed);
      i += value.length;
    } else {
      const next = s.indexOf(GS, i);
      value = next === -1 ? s.slice(i) : s.slice(i, next);
      i += value.length;
    }
    out.push([ai, value]);
  }
  return out;
}

/**
 * Parses a GS1 element string in any of the forms a reader or a person gives it: with a symbology identifier
 * (]d2, ]C1, …) or without; raw, with GS (FNC1) after each variable-length field that is not the last; or in the
 * parentheses form printed under the code. Throws `Gs1Error` (code NOT_GS1 for a code that carries no GS1 data,
 * BAD_CHECK_DIGIT for a GTIN that fails the mod-10 check).
 */
export function parseGs1(input: string, today: Date = new Date()): Gs1Data {
  let s = input.trim();
  const id = s.slice(0, 3);
  // An EAN-13 or UPC-A on the box is a GTIN on its own (no lot or expiry).
  if (EAN_SYMBOLOGY_IDS.has(id) && /^\d{12,13}$/.test(s.slice(3))) {
    return { gtin: normaliseGtin(s.slice(3)), expiryDate: null, lotNumber: null, serialNumber: null, productionDate: null, elements: [{ ai: '01', title: AIS['01'].title, value: normaliseGtin(s.slice(3)) }] };
  }
  if (GS1_SYMBOLOGY_IDS.has(id)) s = s.slice(3);
  else if (PLAIN_SYMBOLOGY_ID.test(id)) throw new Gs1Error('NOT_GS1', 'This code carries no GS1 data (it is not a GS1 DataMatrix or GS1-128).');
  // A leading FNC1 is how some readers pass the GS1 flag on without an identifier.
  if (s.startsWith(GS)) s = s.slice(1);
  if (!s.length) throw new Gs1Error('NOT_GS1', 'The code is empty.');

  const pairs = s.startsWith('(') ? splitBracketed(s) : splitRaw(s);
  const data: Gs1Data = { gtin: null, expiryDate: null, lotNumber: null, serialNumber: null, productionDate: null, elements: [] };
  for (const [ai, value] of pairs) {
    const spec = AIS[ai];
    if (ai.length !== aiLength(ai.slice(0, 2))) throw new Gs1Error('UNKNOWN_AI', `(${ai}) is not a GS1 Application Identifier.`, ai);
    checkValue(ai, spec, value);
    data.elements.push({ ai, title: spec?.title ?? `AI (${ai})`, value });
    switch (ai) {
      case '01':
        data.gtin = normaliseGtin(value);
        break;
      case '17':
        data.expiryDate = gs1Date(value, today);
        break;
      case '11':
        data.productionDate = gs1Date(value, today);
        break;
      case '10':
        data.lotNumber = value;
        break;
      case '21':
        data.serialNumber = value;
        break;
      default:
        if (spec?.kind === 'date') gs1Date(value, today);
    }
  }
  if (!data.gtin && !data.lotNumber && !data.expiryDate) throw new Gs1Error('NOT_GS1', 'The code has no GTIN, lot or expiry date.');
  return data;
}

/** The element string in the parentheses form printed under a code, e.g. "(01)09506000134352(17)260900(10)AB-12". */
export function formatGs1(elements: { ai: string; value: string }[]): string {
  return elements.map((e) => `(${e.ai})${e.value}`).join('');
}

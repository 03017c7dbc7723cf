import { describe, expect, it } from 'vitest';
import { formatGs1, GS, gs1Date, Gs1Error, gtinCheckDigit, normaliseGtin, parseGs1 } from '../../server/lib/gs1.js';

const TODAY = new Date('2026-03-15T12:00:00Z');
const code = (fn: () => unknown) => {
  try {
    fn();
  } catch (e) {
    return e instanceof Gs1Error ? e.code : `not a Gs1Error: ${String(e)}`;
  }
  return 'no error';
};

describe('GTIN check digit (GS1 General Specifications, section 7.9.1: weights 3,1,3,… from the right)', () => {
  it('gives the check digits of the GS1 examples', () => {
    // FACTS 24: GTIN-13 400638133393 → 1 (GS1's worked example; recomputed here by hand: sum 89).
    expect(gtinCheckDigit('400638133393')).toBe(1);
    // The General Specifications' own GTIN-13 figure, 629104150021 → 3 (from memory; recomputed here).
    expect(gtinCheckDigit('629104150021')).toBe(3);
    // GTIN-14 examples used throughout GS1's documents (09506000134352, 09501101530003, 80614141123458; recomputed here).
    expect(gtinCheckDigit('0950600013435')).toBe(2);
    expect(gtinCheckDigit('0950110153000')).toBe(3);
    expect(gtinCheckDigit('8061414112345')).toBe(8);
  });

  it('normalises GTIN-8/12/13 to 14 digits and refuses a wrong check digit', () => {
    expect(normaliseGtin('4006381333931')).toBe('04006381333931');
    expect(normaliseGtin('0950 6000 1343 52')).toBe('09506000134352');
    expect(code(() => normaliseGtin('4006381333932'))).toBe('BAD_CHECK_DIGIT');
    expect(code(() => normaliseGtin('12345'))).toBe('BAD_FIELD');
  });
});

describe('YYMMDD dates (General Specifications, section 3.4.7 and 7.12)', () => {
  it('reads DD = 00 as the last day of the month, leap years included', () => {
    expect(gs1Date('260900', TODAY)).toBe('2026-09-30');
    expect(gs1Date('280200', TODAY)).toBe('2028-02-29');
    expect(gs1Date('270200', TODAY)).toBe('2027-02-28');
    expect(gs1Date('261231', TODAY)).toBe('2026-12-31');
  });

  it('chooses the century within 49 years back and 50 ahead', () => {
    expect(gs1Date('760101', TODAY)).toBe('2076-01-01');
    expect(gs1Date('770101', TODAY)).toBe('1977-01-01');
    expect(code(() => gs1Date('261301', TODAY))).toBe('BAD_DATE');
    expect(code(() => gs1Date('260230', TODAY))).toBe('BAD_DATE');
  });
});

describe('element strings', () => {
  const expected = { gtin: '09506000134352', expiryDate: '2026-09-30', lotNumber: 'AB-12', serialNumber: 'XYZ789' };

  it('reads the parentheses form printed under the code', () => {
    // GS1 General Specifications, section 3.4 (AIs 01, 17, 10, 21) with GS1's example GTIN 09506000134352.
    expect(parseGs1('(01)09506000134352(17)260900(10)AB-12(21)XYZ789', TODAY)).toMatchObject(expected);
    // Spaces as printed in the human-readable line.
    expect(parseGs1('(01) 09506000134352 (17) 260900 (10) AB-12 (21) XYZ789', TODAY)).toMatchObject(expected);
  });

  it('reads the raw form with FNC1 (GS) after a variable-length field that is not last', () => {
    expect(parseGs1(`01095060001343521726090010AB-12${GS}21XYZ789`, TODAY)).toMatchObject(expected);
    // With the DataMatrix and GS1-128 symbology identifiers a reader transmits (ISO/IEC 15424).
    expect(parseGs1(`]d201095060001343521726090010AB-12${GS}21XYZ789`, TODAY)).toMatchObject(expected);
    expect(parseGs1(`]C101095060001343521726090010AB-12${GS}21XYZ789`, TODAY)).toMatchObject(expected);
    // A leading FNC1 in place of the identifier.
    expect(parseGs1(`${GS}01095060001343521726090010AB-12${GS}21XYZ789`, TODAY)).toMatchObject(expected);
  });

  it('needs no separator after fixed-length fields or after the last field', () => {
    // GS1 General Specifications, section 7.8: (01) and (17) have predefined lengths; the lot ends the string.
    const data = parseGs1('0109501101530003172607041' + '0AB-123', TODAY);
    expect(data).toMatchObject({ gtin: '09501101530003', expiryDate: '2026-07-04', lotNumber: 'AB-123', serialNumber: null });
    expect(data.elements.map((e) => e.ai)).toEqual(['01', '17', '10']);
    // Lot before expiry: the separator is needed, and with it the fields come apart.
    expect(parseGs1(`]d20109501101530003` + `10AB-123${GS}17260704`, TODAY)).toMatchObject({ lotNumber: 'AB-123', expiryDate: '2026-07-04' });
  });

  it('keeps fields it does not name, and a production date', () => {
    const data = parseGs1(`]d2010950600013435211250115172701001021-A7${GS}240REF-55`, TODAY);
    expect(data).toMatchObject({ productionDate: '2025-01-15', expiryDate: '2027-01-31', lotNumber: '21-A7' });
    expect(data.elements.at(-1)).toMatchObject({ ai: '240', value: 'REF-55' });
    expect(formatGs1(data.elements)).toBe('(01)09506000134352(11)250115(17)270100(10)21-A7(240)REF-55');
  });

  it('reads an EAN-13 on the box as its GTIN', () => {
    expect(parseGs1(']E04006381333931', TODAY)).toMatchObject({ gtin: '04006381333931', lotNumber: null });
  });

  it('refuses what is not GS1, a wrong check digit, bad dates and overlong fields', () => {
    expect(code(() => parseGs1('HELLO WORLD', TODAY))).toBe('NOT_GS1');
    expect(code(() => parseGs1(']d1LOT 12345', TODAY))).toBe('NOT_GS1');
    expect(code(() => parseGs1(']Q0https://example.invalid/', TODAY))).toBe('NOT_GS1');
    expect(code(() => parseGs1('', TODAY))).toBe('NOT_GS1');
    // One digit of GS1's example GTIN changed: the mod-10 check fails.
    expect(code(() => parseGs1('(01)09506000134353(10)AB-12', TODAY))).toBe('BAD_CHECK_DIGIT');
    expect(code(() => parseGs1('(01)09506000134352(17)261301', TODAY))).toBe('BAD_DATE');
    expect(code(() => parseGs1('(01)0950600013435', TODAY))).toBe('TRUNCATED');
    // A lot of 21 characters: more than AI (10) allows (X..20), e.g. a separator lost before a serial.
    expect(code(() => parseGs1('(01)09506000134352(10)ABCDEFGHIJKLMNOPQRSTU', TODAY))).toBe('BAD_FIELD');
    expect(code(() => parseGs1('(01)09506000134352(10)AB 12', TODAY))).toBe('BAD_FIELD');
    expect(code(() => parseGs1('(23)12', TODAY))).toBe('UNKNOWN_AI');
  });
});

import { describe, expect, it } from 'vitest';
import { isLuhnValid, luhnCheckDigit } from '../../../shared/src/card/luhn';
import { findPans, scanAll } from '../../integration/security/pan-scan';

const withCheck = (payload: string) => payload + luhnCheckDigit(payload);
const digitsOf = (text: string) => findPans(text).map((f) => f.digits);

// Test numbers card schemes publish for their sandboxes (from memory): Visa, Mastercard, Amex, Discover, JCB, Diners.
const PUBLISHED = ['4111111111111111', '4012888888881881', '5555555555554444', '5105105105105100', '378282246310005', '6011111111111117', '3530111333300000', '30569309025904'];

describe('PAN scanner', () => {
  it('agrees with the Luhn check (ISO/IEC 7812-1 Annex B) on the published test numbers and on its worked example', () => {
    for (const pan of PUBLISHED) expect(isLuhnValid(pan), pan).toBe(true);
    // The worked example of ISO/IEC 7812-1 Annex B (from memory) is 11 digits: too short to be reported.
    expect(isLuhnValid('79927398713')).toBe(true);
    expect(digitsOf('79927398713')).toEqual([]);
  });

  it('finds each published number bare, in 4-4-4-4 or 4-6-5 groups, with spaces or dashes, inside JSON, URLs and sentences', () => {
    for (const pan of PUBLISHED) expect(digitsOf(pan)).toEqual([pan]);
    expect(digitsOf('{"card":{"number":"4111 1111 1111 1111"}}')).toEqual(['4111111111111111']);
    expect(digitsOf('GET /api/v1/transactions/5555-5555-5555-4444 404')).toEqual(['5555555555554444']);
    expect(digitsOf('Amex 3782 822463 10005 read out')).toEqual(['378282246310005']);
    expect(digitsOf('card4111111111111111x')).toEqual(['4111111111111111']);
  });

  it('finds a number with more digits typed after it in the same run, and 12 and 19 digit numbers', () => {
    expect(digitsOf('4111 1111 1111 1111 12/27')).toContain('4111111111111111');
    expect(digitsOf('4111111111111111-2031')).toEqual(['4111111111111111']);
    const twelve = withCheck('99009900001');
    const nineteen = withCheck('990099000000000001');
    expect(digitsOf(`a ${twelve} b ${nineteen} c`)).toEqual([twelve, nineteen]);
  });

  it('reports nothing for numbers that fail the check, are too short or too long, or are already masked', () => {
    const wrong = '4111111111111112';
    expect(isLuhnValid(wrong)).toBe(false);
    for (const text of [wrong, '411111111111', '4111 1111 1111 111', '1'.repeat(20), '41111111111111111111', '411111••••••1111', '4111 11•• •••• 1111', '[digits removed]']) {
      expect(digitsOf(text), text).toEqual([]);
    }
  });

  it('skips clock readings, hex digests and UUIDs, whose digit stretches are chance', () => {
    // A Luhn-valid Unix time in milliseconds, as a log line or a job carries it.
    let ms = Date.UTC(2031, 4, 6, 10, 0, 0);
    while (!isLuhnValid(String(ms))) ms += 1;
    expect(digitsOf(`{"time":${ms},"msg":"x"}`)).toEqual([]);
    expect(digitsOf(`${ms}-0`)).toEqual([]);
    expect(digitsOf(`${ms}000`)).toEqual([]);
    // A digest whose digits hold a Luhn-valid run of 16, and a UUID with an all-digit last group.
    expect(digitsOf(`ab${'4111111111111111'}${'c'.repeat(20)}`)).toEqual([]);
    expect(digitsOf(`12345678-1234-4234-8234-${withCheck('99009900000')}`)).toEqual([]);
    // The fraction of a decimal number, as model weights and probabilities are written; a PAN after a word and a dot is still one.
    expect(digitsOf(`{"p":0.${'4111111111111111'}}`)).toEqual([]);
    expect(digitsOf(`12.${'4111111111111111'}`)).toEqual([]);
    expect(digitsOf(`card.${'4111111111111111'}`)).toEqual(['4111111111111111']);
    // A number on its own next to those is still found.
    expect(digitsOf(`${'a'.repeat(40)} 4111111111111111`)).toEqual(['4111111111111111']);
  });

  it('names the source and masks what it found', () => {
    const found = scanAll([
      { source: 'notes.text #1', text: 'nothing here' },
      { source: 'mail 2.json', text: 'card 5555555555554444' },
    ]);
    expect(found).toHaveLength(1);
    expect(found[0]).toMatchObject({ source: 'mail 2.json', shown: '555555••••••4444', index: 5 });
  });
});

import { describe, expect, it } from 'vitest';
import { isLuhnValid, luhnCheckDigit } from '../../../shared/src/card/luhn';
import { maskPansInText } from '../../../shared/src/card/pan';

// Card scheme test numbers as payment sandboxes publish them (from memory); each is checked against the Luhn module first.
const VISA = '4111111111111111';
const MASTERCARD = '5555555555554444';
const AMEX = '378282246310005';

describe('card numbers typed into free text (PCI DSS: at most BIN and last four shown, common practice)', () => {
  it('uses test numbers that pass the Luhn check (ISO/IEC 7812-1 Annex B)', () => {
    for (const pan of [VISA, MASTERCARD, AMEX]) expect(isLuhnValid(pan)).toBe(true);
  });

  it('keeps the BIN and the last four of a bare, spaced or dashed number and hides the rest digit for digit', () => {
    expect(maskPansInText(`Cardholder read out ${VISA} on the phone.`)).toBe('Cardholder read out 411111••••••1111 on the phone.');
    expect(maskPansInText('card 5555 5555 5555 4444, twice')).toBe('card 5555 55•• •••• 4444, twice');
    expect(maskPansInText('Amex 3782-822463-10005')).toBe('Amex 3782-82••••-•0005');
  });

  it('finds a number followed by more digits in the same run (an expiry or a count typed after it)', () => {
    expect(maskPansInText('4111 1111 1111 1111 12/27')).toBe('4111 11•• •••• 1111 12/27');
    expect(maskPansInText(`ref 77 ${MASTERCARD}`)).toBe('ref 77 555555••••••4444');
  });

  it('masks 12 and 19 digit numbers, the ISO/IEC 7812-1 bounds the product uses', () => {
    const twelve = `99009912345${luhnCheckDigit('99009912345')}`;
    const nineteen = `990099123456789012${luhnCheckDigit('990099123456789012')}`;
    expect(maskPansInText(twelve)).toBe(`990099••${twelve.slice(-4)}`);
    expect(maskPansInText(nineteen)).toBe(`990099${'•'.repeat(9)}${nineteen.slice(-4)}`);
  });

  it('leaves runs that fail the Luhn check, shorter runs and longer unbroken runs as typed', () => {
    const wrongDigit = '4111111111111112';
    expect(isLuhnValid(wrongDigit)).toBe(false);
    for (const text of [wrongDigit, 'call +44 20 7946 0958', '11 digits 79927398713', `${'1'.repeat(23)} is an ARN-length reference`]) {
      expect(maskPansInText(text)).toBe(text);
    }
  });

  it('is idempotent and leaves text without digits alone', () => {
    const once = maskPansInText(`a ${VISA} b ${AMEX}`);
    expect(maskPansInText(once)).toBe(once);
    expect(maskPansInText('<img src=x onerror=alert(1)>')).toBe('<img src=x onerror=alert(1)>');
  });
});

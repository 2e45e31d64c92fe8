import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { luhnCheckDigit } from '../../../shared/src/card/luhn';
import { hmacSha256Hex, panHash, tokenisePan } from '../../../server/src/ingest/pan-token';
import { pythonReference } from '../helpers/ingest-reference';

const hex = (s: string) => Buffer.from(s, 'utf8').toString('hex');
const KEY = 'test-pan-hmac-key-0123456789';
const panArb = fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: 11, maxLength: 18 }).map((p) => p + luhnCheckDigit(p));

describe('HMAC-SHA-256 primitive (RFC 4231 test vectors, from memory)', () => {
  it('test case 1: key 0x0b x 20, "Hi There"', () => {
    expect(hmacSha256Hex(Buffer.alloc(20, 0x0b), 'Hi There')).toBe('b0344c61d8db38535ca8afceaf0bf12b881dc200c9833da726e9376c2e32cff7');
  });

  it('test case 2: key "Jefe", "what do ya want for nothing?"', () => {
    expect(hmacSha256Hex('Jefe', 'what do ya want for nothing?')).toBe('5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843');
  });

  it('test case 3: key 0xaa x 20, data 0xdd x 50', () => {
    expect(hmacSha256Hex(Buffer.alloc(20, 0xaa), Buffer.alloc(50, 0xdd))).toBe('773ea91e36800e46854db8ebd09181a72959098b3ef8c122d9635514ced565fe');
  });

  it('test case 6: a key longer than the block size', () => {
    expect(hmacSha256Hex(Buffer.alloc(131, 0xaa), 'Test Using Larger Than Block-Size Key - Hash Key First')).toBe(
      '60e431591ee0b67f0d8a26aacbf5b77f8e0bc6213728c5140546040f0ee37f54',
    );
  });
});

describe('panHash', () => {
  it('is the HMAC of the digits only, as Python hmac computes it for the same UTF-8 key', () => {
    const cases = fc.sample(fc.tuple(fc.string({ minLength: 16, maxLength: 40 }), panArb), { numRuns: 200, seed: 7812 });
    const python = pythonReference<string>('hmac-sha256', cases.map(([k, p]) => [hex(k), hex(p)]));
    cases.forEach(([key, pan], i) => {
      const spaced = pan.replace(/(\d{4})(?=\d)/g, '$1 ');
      expect(panHash(spaced, key)).toBe(python[i]);
    });
  });

  it('gives one hash for every spelling of a number, and another hash under another key', () => {
    fc.assert(
      fc.property(panArb, fc.array(fc.constantFrom('', ' ', '-'), { minLength: 19, maxLength: 19 }), fc.string({ minLength: 16 }), (pan, seps, otherKey) => {
        const spelled = [...pan].map((d, i) => (i === 0 ? d : seps[i] + d)).join('');
        expect(panHash(spelled, KEY)).toBe(panHash(pan, KEY));
        if (otherKey !== KEY) expect(panHash(pan, otherKey)).not.toBe(panHash(pan, KEY));
        expect(panHash(pan, KEY)).toMatch(/^[0-9a-f]{64}$/);
      }),
      { numRuns: 500 },
    );
  });

  it('refuses an empty key and junk, without repeating the number', () => {
    expect(() => panHash('4000000000000002', '')).toThrow(RangeError);
    let caught: unknown;
    try {
      panHash('4000000000000002x', KEY);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(RangeError);
    expect((caught as Error).message).not.toContain('4000000000000002');
  });
});

describe('tokenisePan', () => {
  it('returns BIN, last four and hash, nothing more', () => {
    fc.assert(
      fc.property(panArb, (pan) => {
        const t = tokenisePan(pan, KEY);
        expect(Object.keys(t).sort()).toEqual(['bin', 'last4', 'panHash']);
        expect(t).toEqual({ bin: pan.slice(0, 6), last4: pan.slice(-4), panHash: panHash(pan, KEY) });
      }),
      { numRuns: 300 },
    );
  });
});

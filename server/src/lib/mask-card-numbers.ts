import type { RequestHandler } from 'express';
import { maskPansInText } from '@shared/card/pan';

/**
 * Fields kept as sent: secrets to check, and e-mail addresses (an address is checked at sign-in and
 * mail is delivered to it as typed; masking one that happens to hold a Luhn-valid digit run would
 * lock its owner out). The audit log masks the names it records.
 */
const KEPT_FIELDS = new Set(['password', 'newPassword', 'token', 'email']);

/** Masks the strings of a parsed JSON body in place (own properties only; a `__proto__` key stays a plain property). */
function maskIn(container: Record<string, unknown> | unknown[], depth: number): void {
  const keys = Array.isArray(container) ? container.keys() : Object.keys(container);
  for (const key of keys) {
    if (typeof key === 'string' && KEPT_FIELDS.has(key)) continue;
    const value = (container as Record<string | number, unknown>)[key];
    if (typeof value === 'string') {
      const masked = maskPansInText(value);
      if (masked !== value) Object.defineProperty(container, key, { value: masked, writable: true, enumerable: true, configurable: true });
    } else if (value !== null && typeof value === 'object' && depth < 32) {
      maskIn(value as Record<string, unknown>, depth + 1);
    }
  }
}

/**
 * Staff never need to send a full card number: whatever they type (a note, an
 * e-mail to the cardholder, a reason, a name) has every card number in it
 * masked to BIN and last four before any handler sees it, so it is never
 * stored, mailed, sent upstream or logged (PCI DSS: at most BIN and last four
 * readable, common practice). Upstream routes, which must receive the number
 * to tokenise it, are not behind this.
 */
export const maskCardNumbersInBody: RequestHandler = (req, _res, next) => {
  if (req.body !== null && typeof req.body === 'object') maskIn(req.body as Record<string, unknown>, 0);
  next();
};

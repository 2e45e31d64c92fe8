/**
 * The card-number scanner of the security tests: finds full card numbers
 * (PANs) in any text (database cells, Redis values, log lines, exports, mail).
 *
 * A PAN is 12-19 digits (ISO/IEC 7812-1 allows up to 19; 12 as the shortest
 * issued, common practice) whose last digit is the Luhn check digit (ISO/IEC
 * 7812-1 Annex B). People and systems write it bare or in groups split by
 * single spaces or dashes (4-4-4-4, 4-6-5, ...), so a candidate is either one
 * unbroken run of digits or a window of whole groups of at most six digits.
 * The digits after the point of a decimal number are not a candidate.
 *
 * Written apart from the product's own masking on purpose: a check must not
 * share the code it checks. The Luhn test is the shared module's, which has
 * its own tests against the ISO/IEC 7812-1 worked example.
 */
import { isLuhnValid } from '../../../shared/src/card/luhn';

export interface PanFinding {
  /** The digits only. */
  digits: string;
  /** Offset of the first digit in the scanned text. */
  index: number;
  /** The finding as it appears in the text, masked for messages (never print a found number whole). */
  shown: string;
}

const MIN = 12;
const MAX = 19;
/** Longest group of a grouped PAN: Amex writes 4-6-5 (common practice). */
const MAX_GROUP = 6;

/**
 * Hex digests (32+ hex characters with a letter: MD5, SHA-1, SHA-256, HMAC
 * output) and UUIDs (RFC 9562) are identifiers whose digit stretches are
 * chance: blanked before the search so a hash column never reads as a card.
 */
const HEX_DIGEST = /(?<![0-9A-Za-z])(?=[0-9a-fA-F]*[a-fA-F])[0-9a-fA-F]{32,}(?![0-9A-Za-z])/g;
const UUID = /[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}/g;
const GROUPS = /\d+(?:[ -]\d+)*/g;

/**
 * A clock reading, not a card: an unbroken 13, 16 or 19 digit run that reads
 * as Unix time in milliseconds, microseconds or nanoseconds between 2001-09-09
 * and 2040 (log lines, job timestamps, Redis stream ids are full of them).
 * Card numbers starting 1 or 20-22 at these lengths are not issued by the
 * schemes whose ranges are used here (from memory: UATP airline cards start
 * with 1 and are 15 digits; Mastercard's 2-series starts at 2221).
 */
function looksLikeClock(run: string): boolean {
  if (run.length !== 13 && run.length !== 16 && run.length !== 19) return false;
  const ms = Number(run.slice(0, 13));
  return ms >= 1e12 && ms < Date.UTC(2040, 0, 1);
}

function blank(match: string): string {
  return ' '.repeat(match.length);
}

function shown(digits: string): string {
  return `${digits.slice(0, 6)}${'•'.repeat(digits.length - 10)}${digits.slice(-4)}`;
}

/** Every full card number in `text`, in order of appearance, each once per place. */
export function findPans(text: string): PanFinding[] {
  const searchable = text.replace(UUID, blank).replace(HEX_DIGEST, blank);
  const found: PanFinding[] = [];
  const seen = new Set<string>();
  const report = (digits: string, index: number) => {
    const key = `${index}:${digits}`;
    if (seen.has(key) || !isLuhnValid(digits)) return;
    seen.add(key);
    found.push({ digits, index, shown: shown(digits) });
  };
  for (const m of searchable.matchAll(GROUPS)) {
    const groups: { digits: string; index: number }[] = [];
    for (const g of m[0].matchAll(/\d+/g)) groups.push({ digits: g[0], index: m.index + g.index });
    // The fraction of a decimal number (a probability, a model weight: 0.7045371234568223) is no card.
    if (/\d\.$/.test(searchable.slice(Math.max(0, m.index - 2), m.index))) continue;
    for (const g of groups) {
      if (g.digits.length >= MIN && g.digits.length <= MAX && !looksLikeClock(g.digits)) report(g.digits, g.index);
    }
    // Windows of two or more whole short groups.
    for (let a = 0; a < groups.length; a++) {
      let digits = '';
      for (let b = a; b < groups.length && groups[b].digits.length <= MAX_GROUP; b++) {
        digits += groups[b].digits;
        if (digits.length > MAX) break;
        if (b > a && digits.length >= MIN) report(digits, groups[a].index);
      }
    }
  }
  return found;
}

export interface SourceFinding extends PanFinding {
  /** Where the text came from: a table and column, a Redis key, a log file and line... */
  source: string;
}

/** Scans named texts; returns what was found with its source, for a failure message that says where. */
export function scanAll(texts: Iterable<{ source: string; text: string }>): SourceFinding[] {
  const out: SourceFinding[] = [];
  for (const { source, text } of texts) for (const f of findPans(text)) out.push({ ...f, source });
  return out;
}

/** One line per finding, numbers masked. */
export function describeFindings(findings: SourceFinding[], limit = 40): string {
  const lines = findings.slice(0, limit).map((f) => `${f.source} @${f.index}: ${f.shown}`);
  if (findings.length > limit) lines.push(`... and ${findings.length - limit} more`);
  return lines.join('\n');
}

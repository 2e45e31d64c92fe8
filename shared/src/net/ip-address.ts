/**
 * Strict IP address text parsing, isomorphic (no Node `net` module).
 *
 * IPv4: dotted decimal, four parts 0-255, no leading zeros (RFC 6943 section
 * 3.1.1: "0127.0.0.1" reads as octal to some parsers, so it is ambiguous).
 * IPv6: the text forms of RFC 4291 section 2.2, including "::" and a trailing
 * dotted IPv4 part. Zone identifiers ("fe80::1%eth0", RFC 4007) are refused:
 * they only mean something on the host that wrote them.
 */
export interface ParsedIp {
  readonly version: 4 | 6;
  /** RFC 5952 text form for IPv6 (lower case, shortest, IPv4-mapped in dotted form); IPv4 unchanged. */
  readonly canonical: string;
}

const OCTET = /^(0|[1-9][0-9]{0,2})$/;
const HEXTET = /^[0-9a-fA-F]{1,4}$/;

function parseIpv4(text: string): number[] | null {
  const parts = text.split('.');
  if (parts.length !== 4) return null;
  const octets: number[] = [];
  for (const p of parts) {
    if (!OCTET.test(p)) return null;
    const n = Number(p);
    if (n > 255) return null;
    octets.push(n);
  }
  return octets;
}

function parseHextets(groups: string[]): number[] | null {
  const out: number[] = [];
  for (const g of groups) {
    if (!HEXTET.test(g)) return null;
    out.push(parseInt(g, 16));
  }
  return out;
}

function parseIpv6(text: string): number[] | null {
  if (text.includes('%')) return null;
  let body = text;
  let tail4: number[] | null = null;
  const lastColon = text.lastIndexOf(':');
  if (text.slice(lastColon + 1).includes('.')) {
    const v4 = parseIpv4(text.slice(lastColon + 1));
    if (v4 === null) return null;
    tail4 = [(v4[0] << 8) | v4[1], (v4[2] << 8) | v4[3]];
    // The dotted part fills the last two groups: parse it as two placeholders, then put it in.
    body = `${text.slice(0, lastColon + 1)}0:0`;
  }
  const halves = body.split('::');
  if (halves.length > 2) return null;
  const groupsOf = (s: string): string[] => (s === '' ? [] : s.split(':'));
  const head = parseHextets(groupsOf(halves[0]));
  const rest = halves.length === 2 ? parseHextets(groupsOf(halves[1])) : [];
  if (head === null || rest === null) return null;
  const explicit = head.length + rest.length;
  let groups: number[];
  if (halves.length === 1) {
    if (explicit !== 8) return null;
    groups = head;
  } else {
    // "::" stands for one or more zero groups (RFC 4291 section 2.2, form 2).
    if (explicit > 7) return null;
    groups = [...head, ...new Array<number>(8 - explicit).fill(0), ...rest];
  }
  if (tail4 !== null) groups.splice(6, 2, tail4[0], tail4[1]);
  return groups;
}

/** RFC 5952 section 4: lower case, no leading zeros, the longest run (2+) of zero groups as "::", the first on a tie. */
function formatIpv6(h: number[]): string {
  // RFC 5952 section 5: IPv4-mapped addresses (::ffff:0:0/96) keep the dotted form.
  if (h.slice(0, 5).every((x) => x === 0) && h[5] === 0xffff) {
    return `::ffff:${h[6] >> 8}.${h[6] & 255}.${h[7] >> 8}.${h[7] & 255}`;
  }
  let bestStart = -1;
  let bestLen = 0;
  for (let i = 0; i < 8; ) {
    if (h[i] !== 0) {
      i++;
      continue;
    }
    let j = i;
    while (j < 8 && h[j] === 0) j++;
    if (j - i > bestLen) {
      bestStart = i;
      bestLen = j - i;
    }
    i = j;
  }
  const hex = h.map((x) => x.toString(16));
  if (bestLen < 2) return hex.join(':');
  return `${hex.slice(0, bestStart).join(':')}::${hex.slice(bestStart + bestLen).join(':')}`;
}

/** Parses an IPv4 or IPv6 address; null when `text` is neither. */
export function parseIpAddress(text: unknown): ParsedIp | null {
  if (typeof text !== 'string' || text.length === 0 || text.length > 45) return null;
  if (!text.includes(':')) {
    return parseIpv4(text) === null ? null : { version: 4, canonical: text };
  }
  const groups = parseIpv6(text);
  return groups === null ? null : { version: 6, canonical: formatIpv6(groups) };
}

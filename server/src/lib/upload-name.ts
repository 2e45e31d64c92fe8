import { maskPansInText } from '@shared/card/pan';

/**
 * C0 and C1 control characters, and the bidirectional marks, embeddings,
 * overrides and isolates of Unicode UAX #9, with which "photo\u202Egnp.exe"
 * reads as "photoexe.png".
 */
// eslint-disable-next-line no-control-regex
const UNSAFE = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

/**
 * The name of an uploaded file as people see it: the last part of whatever
 * path the client sent (after / or \), without control or direction
 * characters, card numbers masked to BIN and last four, at most `max`
 * characters with its extension kept; `fallback` when nothing is left. It is
 * only ever shown: stored files get names the server makes.
 */
export function uploadDisplayName(raw: string | undefined, fallback: string, max = 200): string {
  const base = String(raw ?? '').split(/[\\/]/).pop() ?? '';
  const name = maskPansInText(base.replace(UNSAFE, '')).trim();
  if (/^\.*$/.test(name)) return fallback;
  if (name.length <= max) return name;
  const ext = /\.[A-Za-z0-9]{1,8}$/.exec(name)?.[0] ?? '';
  return name.slice(0, max - ext.length) + ext;
}

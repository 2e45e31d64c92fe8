import { open, stat } from 'node:fs/promises';

/** Colour only for people at a terminal; CI logs stay plain unless FORCE_COLOR asks otherwise. */
const colour =
  process.env.NO_COLOR === undefined &&
  (process.env.FORCE_COLOR !== undefined ? process.env.FORCE_COLOR !== '0' : process.stdout.isTTY === true);

const codes = { red: 31, green: 32, yellow: 33, blue: 34, magenta: 35, cyan: 36, grey: 90, bold: 1 } as const;
export type Colour = keyof typeof codes;

export function paint(c: Colour, text: string): string {
  return colour ? `\u001b[${codes[c]}m${text}\u001b[0m` : text;
}

/** Cycles through a few readable colours so each child's prefix is told apart at a glance. */
const prefixColours: Colour[] = ['cyan', 'magenta', 'blue', 'yellow', 'green'];
let nextPrefixColour = 0;
export function pickPrefixColour(): Colour {
  const c = prefixColours[nextPrefixColour % prefixColours.length];
  nextPrefixColour += 1;
  return c;
}

export type Logger = (message: string) => void;

export function tagged(tag: string, c: Colour = 'grey'): Logger {
  return (message) => {
    for (const line of message.split('\n')) process.stdout.write(`${paint(c, `[${tag}]`)} ${line}\n`);
  };
}

/** Last lines of a log file, for explaining why a service did not come up. Never throws. */
export async function tailFile(file: string, lines = 40): Promise<string> {
  try {
    const size = (await stat(file)).size;
    const want = Math.min(size, 64 * 1024);
    const fh = await open(file, 'r');
    try {
      const buf = Buffer.alloc(want);
      await fh.read(buf, 0, want, size - want);
      const text = buf.toString('utf8').replace(/\s+$/, '');
      return text.split('\n').slice(-lines).join('\n');
    } finally {
      await fh.close();
    }
  } catch {
    return `(no log at ${file})`;
  }
}

export function indent(text: string, by = '    '): string {
  return text
    .split('\n')
    .map((l) => by + l)
    .join('\n');
}

export function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

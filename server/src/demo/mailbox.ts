import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';

export interface CapturedMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html?: string | null;
  attachments: { filename: string; contentType: string; size: number }[];
}

const ID = /^[A-Za-z0-9_-]{1,80}$/;

/** Reads the mail the local SMTP catcher captured (demo and tests only). Newest first. */
export async function listCapturedMail(dir: string, limit = 100): Promise<CapturedMail[]> {
  let names: string[];
  try {
    names = (await readdir(dir)).filter((n) => n.endsWith('.json'));
  } catch {
    return [];
  }
  const mails = await Promise.all(
    names.map(async (n) => {
      try {
        return JSON.parse(await readFile(path.join(dir, n), 'utf8')) as CapturedMail;
      } catch {
        return null;
      }
    }),
  );
  return mails
    .filter((m): m is CapturedMail => m !== null)
    .sort((a, b) => b.receivedAt.localeCompare(a.receivedAt))
    .slice(0, limit);
}

export async function readCapturedMail(dir: string, id: string): Promise<CapturedMail | null> {
  if (!ID.test(id)) return null;
  try {
    return JSON.parse(await readFile(path.join(dir, `${id}.json`), 'utf8')) as CapturedMail;
  } catch {
    return null;
  }
}

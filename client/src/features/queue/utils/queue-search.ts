import type { z } from 'zod';
import { queueQuerySchema, type SavedView } from '@shared/api/cases';

/** A queue request with every default filled in: the form the query key and the API call use. */
export type QueueParams = z.output<typeof queueQuerySchema>;
export type QueueView = QueueParams['view'];

export const DEFAULT_QUEUE_PARAMS: QueueParams = queueQuerySchema.parse({});

/** The order keys travel in, so the same view always builds the same URL. */
const KEY_ORDER: (keyof QueueParams)[] = [
  'view',
  'q',
  'status',
  'priority',
  'mcc',
  'country',
  'channel',
  'assignee',
  'minProbability',
  'maxProbability',
  'minAmount',
  'dueWithinMinutes',
  'sort',
  'order',
  'page',
  'pageSize',
];

const LIST_KEYS = new Set<keyof QueueParams>(['status', 'priority', 'mcc', 'country', 'channel']);

function raw(search: URLSearchParams): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const key of KEY_ORDER) {
    const values = search.getAll(key).filter((v) => v.trim() !== '');
    if (values.length === 0) continue;
    out[key] = LIST_KEYS.has(key) ? values.flatMap((v) => v.split(',')).filter((v) => v.trim() !== '') : values[values.length - 1];
  }
  return out;
}

/**
 * Reads the queue's view from the address bar. A hand-edited or outdated link
 * must still open the queue, so a value the schema refuses is dropped (its
 * default applies) rather than failing the whole page.
 */
export function readQueueParams(search: URLSearchParams): QueueParams {
  const input = raw(search);
  for (let attempt = 0; attempt < KEY_ORDER.length; attempt++) {
    const parsed = queueQuerySchema.safeParse(input);
    if (parsed.success) return parsed.data;
    for (const issue of parsed.error.issues) delete input[String(issue.path[0])];
  }
  return DEFAULT_QUEUE_PARAMS;
}

function encode(value: unknown): string {
  return Array.isArray(value) ? value.join(',') : String(value);
}

function isEmpty(value: unknown): boolean {
  return value === undefined || value === '' || (Array.isArray(value) && value.length === 0);
}

/** The address-bar form: only what differs from the defaults, so a plain queue has a plain URL. */
export function writeQueueParams(params: QueueParams): URLSearchParams {
  const out = new URLSearchParams();
  for (const key of KEY_ORDER) {
    const value = params[key];
    if (isEmpty(value) || encode(value) === encode(DEFAULT_QUEUE_PARAMS[key])) continue;
    out.set(key, encode(value));
  }
  return out;
}

/** The API query string: every key spelled out, defaults included, so the server never guesses. */
export function queueApiSearch(params: QueueParams): string {
  const out = new URLSearchParams();
  for (const key of KEY_ORDER) {
    const value = params[key];
    if (isEmpty(value)) continue;
    out.set(key, encode(value));
  }
  return out.toString();
}

/** A change to what is shown goes back to the first page, unless the change is the page itself. */
export function changeQueueParams(params: QueueParams, changes: Partial<QueueParams>): QueueParams {
  const next = { ...params, ...changes };
  if (!('page' in changes)) next.page = 1;
  for (const key of Object.keys(next) as (keyof QueueParams)[]) {
    if (isEmpty(next[key])) delete next[key];
  }
  return queueQuerySchema.parse(next);
}

/** Filters in effect besides view, sort and paging: what "clear filters" clears and saved views keep. */
export const FILTER_KEYS = KEY_ORDER.filter((k) => !['view', 'sort', 'order', 'page', 'pageSize'].includes(k));

export function activeFilterCount(params: QueueParams): number {
  return FILTER_KEYS.filter((key) => !isEmpty(params[key])).length;
}

/** What a saved view keeps: everything but the page, which is where one was, not what one looks at. */
export function savedQueryOf(params: QueueParams): SavedView['query'] {
  const query: Record<string, unknown> = {};
  for (const key of KEY_ORDER) {
    if (key === 'page' || isEmpty(params[key])) continue;
    query[key] = params[key];
  }
  return query as SavedView['query'];
}

export function paramsOfSavedView(query: SavedView['query']): QueueParams {
  return queueQuerySchema.parse({ ...query, page: 1 });
}

/** Whether the queue shows exactly what a saved view would, page aside. */
export function showsSavedView(params: QueueParams, query: SavedView['query']): boolean {
  const here = writeQueueParams({ ...params, page: 1 }).toString();
  const saved = queueQuerySchema.safeParse({ ...query, page: 1 });
  return saved.success && writeQueueParams(saved.data).toString() === here;
}

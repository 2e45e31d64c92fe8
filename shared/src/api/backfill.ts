/**
 * The CSV back-fill contract: the columns a file may have, the limits, the
 * import run as the API and the progress events describe it. Read by the
 * server (which enforces it) and the client (which explains it and parses
 * what the server sends).
 */
import { z } from 'zod';

/** Largest file one upload may carry (SI megabytes, as the page states it). */
export const BACKFILL_MAX_BYTES = 200 * 1000 * 1000;
export const BACKFILL_MAX_LABEL = '200 MB';

/** Columns every file must have; a missing one would reject every row, so the file is refused instead. */
export const BACKFILL_REQUIRED_COLUMNS = [
  'id',
  'occurredAt',
  'amount',
  'currency',
  'card.number',
  'card.cardholderId',
  'merchant.id',
  'merchant.name',
  'merchant.mcc',
  'merchant.country',
  'cardPresent',
] as const;

export const BACKFILL_OPTIONAL_COLUMNS = ['channel', 'deviceId', 'ip', 'location.lat', 'location.lon', 'label', 'labelReportedAt'] as const;

export const BACKFILL_COLUMNS: readonly string[] = [...BACKFILL_REQUIRED_COLUMNS, ...BACKFILL_OPTIONAL_COLUMNS];

/** Socket.IO event sent to the uploader's sockets while an import runs. */
export const BACKFILL_PROGRESS_EVENT = 'backfill:progress';

/** Multipart field names of the upload, in the order they must be sent (fields after the file are not read). */
export const BACKFILL_FILE_FIELD = 'file';
export const BACKFILL_CLIENT_REF_FIELD = 'clientRef';
/** What a client reference may look like: the page sends a random UUID to recognise its own run's events. */
export const CLIENT_REF_PATTERN = /^[A-Za-z0-9-]{8,64}$/;

/** interrupted: the run stopped reporting without finishing (the server went down mid-file). */
export const BACKFILL_STATUSES = ['running', 'completed', 'failed', 'interrupted'] as const;
export type BackfillStatus = (typeof BACKFILL_STATUSES)[number];

export const backfillCountsSchema = z.object({
  /** Data rows read so far (the header is not counted). */
  rowsRead: z.number().int().nonnegative(),
  accepted: z.number().int().nonnegative(),
  duplicate: z.number().int().nonnegative(),
  rejected: z.number().int().nonnegative(),
  /** Labels recorded, on new rows and on transactions already stored. */
  labelsAdded: z.number().int().nonnegative(),
  /** Bytes of the file received so far. */
  bytesRead: z.number().int().nonnegative(),
});
export type BackfillCounts = z.infer<typeof backfillCountsSchema>;

export const backfillImportSchema = z.object({
  id: z.number().int().positive(),
  fileName: z.string(),
  status: z.enum(BACKFILL_STATUSES),
  counts: backfillCountsSchema,
  startedAt: z.string(),
  finishedAt: z.string().nullable(),
  /** Why a run failed as a whole (bad header, file too large, upload cut off). */
  error: z.object({ code: z.string(), message: z.string() }).nullable(),
  /** Where the per-row error report downloads from; null while there is none. */
  errorReportUrl: z.string().nullable(),
  uploadedBy: z.object({ id: z.number().int(), displayName: z.string() }),
});
export type BackfillImport = z.infer<typeof backfillImportSchema>;

export const backfillProgressEventSchema = backfillImportSchema.extend({
  /** The client reference sent with the upload, so a page can tell its own run from another tab's. */
  clientRef: z.string().nullable(),
});
export type BackfillProgressEvent = z.infer<typeof backfillProgressEventSchema>;

export const backfillImportResponseSchema = z.object({ import: backfillImportSchema });
export const backfillImportListSchema = z.object({ imports: z.array(backfillImportSchema) });

/** Where a run's per-row error report downloads from (it exists once a row is rejected). */
export const backfillErrorReportUrl = (importId: number) => `/api/backfill/${importId}/errors.csv`;

/** Header of the per-row error report. `row` is the line of the file (the header is line 1). */
export const ERROR_REPORT_COLUMNS = ['row', 'id', 'field', 'message'] as const;

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiErrorSchema, CSRF_HEADER, csrfResponseSchema } from '@shared/api/auth';
import {
  BACKFILL_CLIENT_REF_FIELD,
  BACKFILL_FILE_FIELD,
  backfillImportResponseSchema,
  backfillImportSchema,
  type BackfillImport,
} from '@shared/api/backfill';
import { api, ApiError, setCsrfToken } from '@/lib/api-client';
import { importsQueryOptions } from './get-imports';

export type SendProgress = { loaded: number; total: number };

/** The server refused the file or stopped the run; `run` is the run's summary when one was recorded. */
export class UploadRefused extends ApiError {
  readonly run: BackfillImport | null;

  constructor(options: ConstructorParameters<typeof ApiError>[0] & { run: BackfillImport | null }) {
    super(options);
    this.name = 'UploadRefused';
    this.run = options.run;
  }
}

const refusalSchema = apiErrorSchema.extend({ import: backfillImportSchema.optional() });

async function freshCsrfToken(): Promise<string> {
  const { csrfToken } = await api.get('/api/auth/csrf', { schema: csrfResponseSchema });
  setCsrfToken(csrfToken);
  return csrfToken;
}

type UploadOptions = { clientRef: string; onSendProgress?: (p: SendProgress) => void; signal?: AbortSignal };

// fetch cannot report upload progress; XMLHttpRequest's upload.onprogress can.
function send(file: File, token: string, o: UploadOptions): Promise<BackfillImport> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/backfill/transactions');
    xhr.setRequestHeader(CSRF_HEADER, token);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.responseType = 'text';
    xhr.upload.onprogress = (e) => o.onSendProgress?.({ loaded: e.loaded, total: e.lengthComputable ? e.total : file.size });
    xhr.onerror = () => reject(new ApiError({ status: 0, code: 'network_error', message: 'Cannot reach the server. Check the connection and try again.' }));
    xhr.onabort = () => reject(new DOMException('The upload was cancelled.', 'AbortError'));
    xhr.onload = () => {
      let body: unknown;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        resolve(backfillImportResponseSchema.parse(body).import);
        return;
      }
      const refusal = refusalSchema.safeParse(body);
      reject(
        refusal.success
          ? new UploadRefused({ status: xhr.status, ...refusal.data.error, run: refusal.data.import ?? null })
          : new UploadRefused({ status: xhr.status, code: `http_${xhr.status}`, message: `The server answered ${xhr.status}.`, run: null }),
      );
    };
    o.signal?.addEventListener('abort', () => xhr.abort(), { once: true });
    // The reference goes first: the server reads fields only until the file starts.
    const form = new FormData();
    form.append(BACKFILL_CLIENT_REF_FIELD, o.clientRef);
    form.append(BACKFILL_FILE_FIELD, file, file.name);
    xhr.send(form);
  });
}

/**
 * Uploads a CSV file for back-fill and resolves with the run's final summary.
 * Carries the session's CSRF token; a stale token is fetched again and the
 * file sent once more.
 */
export async function uploadTransactionsCsv(file: File, o: UploadOptions): Promise<BackfillImport> {
  try {
    return await send(file, await freshCsrfToken(), o);
  } catch (error) {
    if (!(error instanceof ApiError && error.status === 403 && error.code === 'csrf_invalid')) throw error;
    return send(file, await freshCsrfToken(), o);
  }
}

export function useUploadTransactions(onSendProgress: (p: SendProgress) => void) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, clientRef, signal }: { file: File; clientRef: string; signal?: AbortSignal }) =>
      uploadTransactionsCsv(file, { clientRef, signal, onSendProgress }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: importsQueryOptions().queryKey }),
  });
}

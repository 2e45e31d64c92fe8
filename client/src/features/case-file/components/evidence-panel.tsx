import { useId, useRef, useState } from 'react';
import { EVIDENCE_TYPES, type CaseEvidence } from '@shared/api/cases';
import { formatDateTime } from '@/lib/time';
import { evidenceDownloadUrl, evidenceProblem, useUploadEvidence } from '../api/upload-evidence';
import { serverProblem } from '../utils/form-errors';

function size(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(0)} KB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

const TYPE_WORDS: Record<string, string> = { 'image/png': 'PNG', 'image/jpeg': 'JPEG', 'application/pdf': 'PDF', 'text/csv': 'CSV' };

/** Evidence files: upload (type and size checked here too), list, download. */
export function EvidencePanel({ caseId, evidence }: { caseId: number; evidence: CaseEvidence[] }) {
  const inputId = useId();
  const input = useRef<HTMLInputElement>(null);
  const upload = useUploadEvidence(caseId);
  const [problem, setProblem] = useState<string | null>(null);

  const onPick = (file: File | undefined) => {
    setProblem(null);
    upload.reset();
    if (!file) return;
    const refused = evidenceProblem(file);
    if (refused) {
      setProblem(`${file.name}: ${refused}`);
      return;
    }
    upload.mutate(file, {
      onSettled: () => {
        if (input.current) input.current.value = '';
      },
    });
  };

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-col gap-1">
        <label htmlFor={inputId} className="text-sm font-medium text-text">
          Attach a file
        </label>
        <p className="text-xs text-muted">PNG, JPEG, PDF or CSV, up to 10 MB.</p>
        <input
          ref={input}
          id={inputId}
          type="file"
          accept={EVIDENCE_TYPES.join(',')}
          onChange={(event) => onPick(event.target.files?.[0])}
          disabled={upload.isPending}
          className="text-xs text-text file:mr-2 file:h-7 file:rounded file:border file:border-control file:bg-surface file:px-2 file:text-xs file:text-text"
        />
        {upload.isPending && <p role="status" className="text-xs text-muted">Uploading…</p>}
        {(problem || upload.isError) && (
          <p role="alert" className="text-xs text-danger">
            {problem ?? serverProblem(upload.error)}
          </p>
        )}
      </div>
      {evidence.length === 0 ? (
        <p className="text-xs text-muted">No evidence attached yet.</p>
      ) : (
        <ul className="divide-y divide-border" aria-label="Evidence files">
          {evidence.map((file) => (
            <li key={file.id} className="flex flex-wrap items-baseline justify-between gap-x-3 py-1 text-xs">
              <a href={evidenceDownloadUrl(caseId, file.id)} download={file.fileName} className="font-medium break-all text-link underline underline-offset-2">
                {file.fileName}
              </a>
              <span className="text-muted">
                {TYPE_WORDS[file.contentType] ?? file.contentType} · {size(file.size)} · {file.uploadedBy.displayName} ·{' '}
                <time dateTime={file.createdAt}>{formatDateTime(file.createdAt)}</time>
              </span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

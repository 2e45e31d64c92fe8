import { noteSchema, type CaseNote } from '@shared/api/cases';
import { KeyHint } from '@/components/ui/key-hint';
import { formatDateTime } from '@/lib/time';
import { useAddNote } from '../api/add-note';
import { TextForm } from './text-form';

/** Notes: plain text, newest first. Rendered as text, never as markup. */
export function NotesPanel({
  caseId,
  notes,
  textareaRef,
}: {
  caseId: number;
  notes: CaseNote[];
  textareaRef?: (element: HTMLTextAreaElement | null) => void;
}) {
  const addNote = useAddNote(caseId);
  const ordered = [...notes].sort((a, b) => Date.parse(b.createdAt) - Date.parse(a.createdAt));
  return (
    <div className="flex flex-col gap-3">
      <TextForm
        label="New note"
        schema={noteSchema.shape.text}
        submitLabel="Add note"
        pendingLabel="Adding…"
        rows={2}
        onSubmit={(text) => addNote.mutateAsync(text)}
        textareaRef={textareaRef}
        extraButtons={
          <span className="text-xs text-muted">
            <KeyHint keys="n" /> to start one, <KeyHint keys="Ctrl+Enter" /> to add it
          </span>
        }
      />
      {ordered.length === 0 ? (
        <p className="text-xs text-muted">No notes yet.</p>
      ) : (
        <ol className="flex flex-col divide-y divide-border" aria-label="Notes">
          {ordered.map((note) => (
            <li key={note.id} className="py-1.5">
              <p className="text-xs text-muted">
                <span className="font-medium text-text">{note.author.displayName}</span> ·{' '}
                <time dateTime={note.createdAt}>{formatDateTime(note.createdAt)}</time>
              </p>
              <p className="mt-0.5 text-sm break-words whitespace-pre-wrap text-text">{note.text}</p>
            </li>
          ))}
        </ol>
      )}
    </div>
  );
}

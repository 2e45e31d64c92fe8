import { useEffect, useId, useRef, type ReactNode } from 'react';

/**
 * A modal dialog: focus moves in when it opens and back where it was when it
 * closes, Tab stays inside, Escape and a click outside cancel.
 */
export function Dialog({
  title,
  onClose,
  children,
  initialFocus,
  action,
}: {
  title: string;
  onClose: () => void;
  children: ReactNode;
  /** The element to focus first; otherwise the first focusable one. */
  initialFocus?: React.RefObject<HTMLElement | null>;
  /** Shown beside the title (a close button, say). */
  action?: ReactNode;
}) {
  const titleId = useId();
  const dialogRef = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const returnTo = document.activeElement instanceof HTMLElement ? document.activeElement : null;
    const first = initialFocus?.current ?? dialogRef.current?.querySelector<HTMLElement>('textarea, input, select, button');
    first?.focus();
    return () => returnTo?.focus();
  }, [initialFocus]);

  const onKeyDown = (event: React.KeyboardEvent) => {
    if (event.key === 'Escape') {
      event.stopPropagation();
      event.nativeEvent.stopImmediatePropagation();
      onClose();
      return;
    }
    if (event.key !== 'Tab' || !dialogRef.current) return;
    const focusable = dialogRef.current.querySelectorAll<HTMLElement>(
      'button:not([disabled]), [href], input, select, textarea, [tabindex]:not([tabindex="-1"])',
    );
    const first = focusable[0];
    const last = focusable[focusable.length - 1];
    if (event.shiftKey && document.activeElement === first) {
      event.preventDefault();
      last?.focus();
    } else if (!event.shiftKey && document.activeElement === last) {
      event.preventDefault();
      first?.focus();
    }
  };

  return (
    <div className="fixed inset-0 z-40 flex items-start justify-center bg-black/40 px-4 pt-[12vh]" onClick={onClose}>
      <div
        ref={dialogRef}
        role="dialog"
        aria-modal="true"
        aria-labelledby={titleId}
        onKeyDown={onKeyDown}
        onClick={(event) => event.stopPropagation()}
        className="w-full max-w-md rounded border border-border bg-surface p-4 shadow-lg"
      >
        <div className="flex items-center justify-between gap-2">
          <h2 id={titleId} className="text-base font-semibold text-text">
            {title}
          </h2>
          {action}
        </div>
        <div className="mt-2">{children}</div>
      </div>
    </div>
  );
}

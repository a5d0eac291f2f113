import { useEffect, useId, useRef, type ReactNode } from 'react';
import { button, primaryButton } from './sheet-styles';

/**
 * A modal question with a confirming and a cancelling button (a native dialog: focus stays inside,
 * Escape cancels). Cancel has the focus when it opens, so Enter alone changes nothing.
 */
export default function ConfirmDialog({
  open,
  title,
  confirmLabel,
  onConfirm,
  onCancel,
  children,
}: {
  open: boolean;
  title: string;
  confirmLabel: string;
  onConfirm: () => void;
  onCancel: () => void;
  children: ReactNode;
}) {
  const dialog = useRef<HTMLDialogElement>(null);
  const cancel = useRef<HTMLButtonElement>(null);
  const id = useId();
  useEffect(() => {
    const element = dialog.current;
    if (!element) return;
    if (open && !element.open) {
      element.showModal();
      cancel.current?.focus();
    } else if (!open && element.open) element.close();
  }, [open]);
  return (
    <dialog
      ref={dialog}
      aria-labelledby={`${id}-title`}
      className="m-auto w-[min(32rem,calc(100vw-2rem))] border-2 border-ink bg-paper p-5 text-ink shadow-[6px_6px_0_0_var(--color-ink)] backdrop:bg-ink/40"
      onCancel={(event) => {
        event.preventDefault();
        onCancel();
      }}
    >
      <h2 id={`${id}-title`} className="text-base font-semibold">
        {title}
      </h2>
      <div className="mt-2 text-sm text-graphite">{children}</div>
      <div className="mt-4 flex justify-end gap-3">
        <button ref={cancel} type="button" className={button} onClick={onCancel}>
          Cancel
        </button>
        <button type="button" className={primaryButton} onClick={onConfirm}>
          {confirmLabel}
        </button>
      </div>
    </dialog>
  );
}

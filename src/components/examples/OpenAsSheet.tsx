import { useState } from 'react';
import { ApiError, requestJson, UNREACHABLE } from '../../lib/client/api';
import type { CreatedSheet, Wire } from '../../lib/contract';
import { primaryButton } from '../sheet/sheet-styles';

/**
 * "Open as a new sheet": imports the example's sheet document into the user's team through the
 * sheets import route (the same path as a file import) and opens the new sheet at a section.
 */
export default function OpenAsSheet({
  teamId,
  fileName,
  content,
  sections,
}: {
  teamId: string;
  fileName: string;
  /** The sheet file's text, as the example ships it. */
  content: string;
  sections: { id: string; number: number; title: string }[];
}) {
  const [busy, setBusy] = useState(false);
  const [failure, setFailure] = useState<string>();

  async function open(section: string) {
    setBusy(true);
    setFailure(undefined);
    try {
      const { sheetId } = await requestJson<Wire<CreatedSheet>>('/api/sheets/import', { method: 'POST', body: { teamId, fileName, content } });
      window.location.assign(`/sheets/${encodeURIComponent(sheetId)}#${section}`);
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : UNREACHABLE);
      setBusy(false);
    }
  }

  return (
    <div className="space-y-2" data-testid="open-as-sheet">
      <button type="button" className={primaryButton} disabled={busy} onClick={() => void open(sections[0]?.id ?? 'sheet-summary')} data-testid="open-as-sheet-button">
        {busy ? 'Opening…' : 'Open as a new sheet'}
      </button>
      <p className="text-xs text-graphite">
        Or open it at the section this example explains:{' '}
        {sections.map((section, i) => (
          <span key={section.id}>
            {i > 0 && ', '}
            <button type="button" className="underline decoration-rule hover:text-verdigris-deep disabled:opacity-60" disabled={busy} onClick={() => void open(section.id)} data-section={section.id}>
              §{section.number} {section.title}
            </button>
          </span>
        ))}
        .
      </p>
      {failure && (
        <p role="alert" className="text-sm text-sienna">
          {failure}
        </p>
      )}
    </div>
  );
}

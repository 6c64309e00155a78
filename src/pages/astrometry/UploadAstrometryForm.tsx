// Upload an IAU ADES PSV file (or pasted text) of optical astrometry for one object. A refused file shows every
// issue the server found, by line number and field; nothing of it is stored. An accepted file reports how many
// observations were added and which lines were skipped as already stored.
import { useState, type FormEvent } from 'react';
import type { UploadAstrometryResult } from '../../../shared/schemas/odApi';
import { astrometryIssues, useUploadAstrometry } from '../../api/od';
import { FileOrPasteFields, useFileOrPaste } from '../../components/FileOrPaste';
import { Button, Card, Notice, errorMessage } from '../../components/ui';
import { formatObsTime } from './format';

export function UploadAstrometryForm({ objectId }: { objectId: number }) {
  const upload = useUploadAstrometry(objectId);
  const input = useFileOrPaste();
  const [localError, setLocalError] = useState<string | null>(null);
  const [done, setDone] = useState<{ result: UploadAstrometryResult; name: string } | null>(null);
  const issues = astrometryIssues(upload.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    setLocalError(null);
    setDone(null);
    const taken = input.take(5_000_000, (file) => `${file.name} is ${(file.size / 1e6).toFixed(1)} MB: 5 MB at most.`, 'Choose an ADES PSV file or paste its text.', 'pasted text');
    if ('error' in taken) {
      setLocalError(taken.error);
      return;
    }
    upload.mutate(taken.source, {
      onSuccess: (result) => {
        setDone({ result, name: taken.name });
        input.reset();
      },
    });
  };

  return (
    <Card aria-labelledby="upload-astrometry-heading">
      <h2 id="upload-astrometry-heading" className="mb-1 text-lg font-semibold">Add astrometry</h2>
      <p className="mb-4 text-sm text-ink-soft">
        IAU ADES pipe-separated (PSV) file: the version line, header groups, the column line, then one observation per line. Lines already stored
        (same station and time) are skipped. A file with any bad line is refused whole, with the line numbers.
      </p>
      <form onSubmit={submit} className="space-y-4" noValidate>
        <FileOrPasteFields state={input} id="ades-file" fileLabel="ADES PSV file" accept=".psv,.txt,text/plain" placeholder={'# version=2022\n# observatory\n! mpcCode …'} />
        {localError && <Notice tone="error">{localError}</Notice>}
        <Button type="submit" busy={upload.isPending}>Upload the astrometry</Button>
      </form>

      {upload.isError && (
        <div className="mt-4" data-testid="ades-refused">
          <Notice tone="error" title="The file was refused">
            {/* the server's message lists the issues too: with the table below, a count is enough */}
            <p>
              {issues.length > 0
                ? `${issues.length} problem${issues.length === 1 ? '' : 's'} found; nothing was stored. Correct the lines below and upload the whole file again.`
                : errorMessage(upload.error)}
            </p>
          </Notice>
          {issues.length > 0 && (
            <div className="mt-3 max-h-80 overflow-auto rounded-md border border-danger-200">
              <table className="w-full text-left text-sm" data-testid="ades-issues">
                <caption className="sr-only">Problems found in the file, by line</caption>
                <thead className="sticky top-0 bg-danger-50">
                  <tr>
                    <th scope="col" className="px-3 py-1.5">Line</th>
                    <th scope="col" className="px-3 py-1.5">Field</th>
                    <th scope="col" className="px-3 py-1.5">Problem</th>
                  </tr>
                </thead>
                <tbody>
                  {issues.map((i, k) => (
                    <tr key={k} className="border-t border-danger-200 align-top">
                      <td className="px-3 py-1.5 tabular-nums">{i.line === 0 ? 'file' : `line ${i.line}`}</td>
                      <td className="px-3 py-1.5 font-mono text-xs">{i.field ?? '—'}</td>
                      <td className="px-3 py-1.5">{i.message}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
      )}

      {done && (
        <Notice tone="success" className="mt-4" title={`${done.name}: ${done.result.added} observation${done.result.added === 1 ? '' : 's'} added`}>
          {done.result.duplicates.length === 0 ? (
            <p>No line repeated a stored observation.</p>
          ) : (
            <details>
              <summary>{done.result.duplicates.length} line{done.result.duplicates.length === 1 ? '' : 's'} skipped: already stored</summary>
              <ul className="mt-1 list-disc pl-5">
                {done.result.duplicates.slice(0, 50).map((d) => (
                  <li key={d.line}>line {d.line}: {d.stn} {formatObsTime(d.obsTime)} (stored as #{d.existingId})</li>
                ))}
                {done.result.duplicates.length > 50 && <li>… and {done.result.duplicates.length - 50} more</li>}
              </ul>
            </details>
          )}
        </Notice>
      )}
    </Card>
  );
}

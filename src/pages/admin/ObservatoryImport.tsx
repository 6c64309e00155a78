// "Import a file" card of the Observatories admin screen: a JSON file in the CLI's form ({"observatories": [...]},
// README) chosen or pasted, with an explicit choice for codes already in the table (refuse them, or replace their
// name and position). A refused file is listed entry by entry and field by field; nothing of it is stored. The
// list below refreshes on success (the hook invalidates the observatories query).
import { useState, type FormEvent } from 'react';
import { MAX_OBSERVATORY_FILE_BYTES, observatoryImportIssueSchema, type ImportObservatoriesResult, type ObservatoryImportIssue, type ObservatoryImportMode } from '../../../shared/schemas/odApi';
import { ApiError } from '../../api/client';
import { useImportObservatories } from '../../api/od';
import { FileOrPasteFields, useFileOrPaste } from '../../components/FileOrPaste';
import { Button, Card, Notice, errorMessage } from '../../components/ui';

/** The per-entry issues of a refused file (422, details.issues); [] for any other error. */
function importIssues(error: unknown): ObservatoryImportIssue[] {
  if (!(error instanceof ApiError)) return [];
  const list = (error.details as { issues?: unknown } | undefined)?.issues;
  if (!Array.isArray(list)) return [];
  return list.flatMap((i) => {
    const parsed = observatoryImportIssueSchema.safeParse(i);
    return parsed.success ? [parsed.data] : [];
  });
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

function summary(r: ImportObservatoriesResult): string {
  const parts = [`${r.added} added`, `${r.replaced} replaced`];
  if (r.unchanged) parts.push(`${r.unchanged} already the same`);
  return parts.join(', ');
}

export function ObservatoryImport() {
  const importer = useImportObservatories();
  const input = useFileOrPaste();
  const [mode, setMode] = useState<ObservatoryImportMode>('add-only');
  const [localError, setLocalError] = useState<string | null>(null);
  const [done, setDone] = useState<{ result: ImportObservatoriesResult; name: string } | null>(null);
  const issues = importIssues(importer.error);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    setLocalError(null);
    setDone(null);
    const taken = input.take(
      MAX_OBSERVATORY_FILE_BYTES,
      (file) => `${file.name} is ${Math.round(file.size / 1000)} kB: ${MAX_OBSERVATORY_FILE_BYTES / 1000} kB at most.`,
      'Choose an observatory file or paste its text.',
      'Pasted text',
    );
    if ('error' in taken) {
      setLocalError(taken.error);
      return;
    }
    importer.mutate(
      { source: taken.source, mode },
      {
        onSuccess: (result) => {
          setDone({ result, name: taken.name });
          input.reset();
        },
      },
    );
  };

  return (
    <Card aria-labelledby="import-observatories-heading">
      <h2 id="import-observatories-heading" className="mb-1 text-lg font-semibold">Import a file</h2>
      <p className="mb-4 text-sm text-ink-soft">
        A JSON file in the form the command line's <code>fit --observatories</code> reads: <code>{'{"observatories": [{"code": …, "name": …, "longitudeDeg": …}, …]}'}</code>.
        A file with any bad entry is refused whole, with the entry numbers.
      </p>
      <form onSubmit={submit} className="space-y-4" noValidate>
        <FileOrPasteFields state={input} id="observatory-file" fileLabel="Observatory file (JSON)" accept=".json,application/json,text/plain" placeholder={'{"observatories": [ … ]}'} />
        <fieldset>
          <legend className="mb-1 text-sm font-medium">When a site is already in the table</legend>
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name="observatory-import-mode" value="add-only" checked={mode === 'add-only'} onChange={() => setMode('add-only')} />
            Refuse the whole file (add-only)
          </label>
          <label className="flex items-center gap-2 text-sm">
            <input type="radio" name="observatory-import-mode" value="replace" checked={mode === 'replace'} onChange={() => setMode('replace')} />
            Replace the stored site, as Edit does (replace)
          </label>
        </fieldset>
        {localError && <Notice tone="error">{localError}</Notice>}
        <Button type="submit" busy={importer.isPending}>Import the observatories</Button>
      </form>

      {importer.isError && (
        <div className="mt-4" data-testid="observatory-import-refused">
          <Notice tone="error" title="The file was refused">
            <p>
              {issues.length > 0
                ? `${plural(issues.length, 'problem')} found; nothing was stored. Correct the entries below and import the whole file again.`
                : errorMessage(importer.error)}
            </p>
          </Notice>
          {issues.length > 0 && (
            <div className="mt-3 max-h-80 overflow-auto rounded-md border border-danger-200">
              <table className="w-full text-left text-sm" data-testid="observatory-import-issues">
                <caption className="sr-only">Problems found in the file, by entry</caption>
                <thead className="sticky top-0 bg-danger-50">
                  <tr>
                    <th scope="col" className="px-3 py-1.5">Entry</th>
                    <th scope="col" className="px-3 py-1.5">Code</th>
                    <th scope="col" className="px-3 py-1.5">Field</th>
                    <th scope="col" className="px-3 py-1.5">Problem</th>
                  </tr>
                </thead>
                <tbody>
                  {issues.map((i, k) => (
                    <tr key={k} className="border-t border-danger-200 align-top">
                      <td className="px-3 py-1.5 tabular-nums">{i.entry === null ? 'file' : `entry ${i.entry}`}</td>
                      <td className="px-3 py-1.5 font-mono text-xs">{i.code ?? '—'}</td>
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
        <Notice tone="success" className="mt-4" title={`${done.name}: ${summary(done.result)}`}>
          <ul className="list-disc pl-5">
            {done.result.addedCodes.length > 0 && <li>Added: {done.result.addedCodes.join(', ')}</li>}
            {done.result.replacedCodes.length > 0 && <li>Replaced: {done.result.replacedCodes.join(', ')}</li>}
            {done.result.unchangedCodes.length > 0 && <li>Already the same: {done.result.unchangedCodes.join(', ')}</li>}
          </ul>
        </Notice>
      )}
    </Card>
  );
}

// A file input with a "…or paste the text" box beside it (astrometry upload, observatory import): one hook holds the
// state and turns it into the source to send (or a clear message: too large, nothing chosen), one component draws
// the two fields. The paste box is disabled while a file is chosen.
import { useRef, useState } from 'react';

export type FileOrText = { kind: 'file'; file: File } | { kind: 'text'; text: string };

export function useFileOrPaste() {
  const fileRef = useRef<HTMLInputElement>(null);
  const [pasted, setPasted] = useState('');
  const [fileName, setFileName] = useState<string | null>(null);
  return {
    fileRef,
    pasted,
    setPasted,
    fileName,
    setFileName,
    /**
     * The source to send with its display name, or the message to show: a file above maxBytes (sizeText says the
     * limit and the file's size in words), or neither a file nor text (missingMessage).
     */
    take(maxBytes: number, sizeText: (file: File) => string, missingMessage: string, pastedName: string): { source: FileOrText; name: string } | { error: string } {
      const file = fileRef.current?.files?.[0] ?? null;
      if (file && file.size > maxBytes) return { error: sizeText(file) };
      if (!file && !pasted.trim()) return { error: missingMessage };
      return file ? { source: { kind: 'file', file }, name: file.name } : { source: { kind: 'text', text: pasted }, name: pastedName };
    },
    /** Empty both fields (after an accepted upload). */
    reset() {
      setPasted('');
      setFileName(null);
      if (fileRef.current) fileRef.current.value = '';
    },
  };
}

export function FileOrPasteFields({
  state,
  id,
  fileLabel,
  accept,
  placeholder,
}: {
  state: ReturnType<typeof useFileOrPaste>;
  /** id of the file input; the text box gets `${id}-text` */
  id: string;
  fileLabel: string;
  accept: string;
  placeholder: string;
}) {
  return (
    <>
      <div>
        <label htmlFor={id} className="mb-1 block text-sm font-medium">{fileLabel}</label>
        <input
          id={id}
          ref={state.fileRef}
          type="file"
          accept={accept}
          className="block text-sm"
          onChange={(e) => state.setFileName(e.target.files?.[0]?.name ?? null)}
        />
      </div>
      <div>
        <label htmlFor={`${id}-text`} className="mb-1 block text-sm font-medium">…or paste the text</label>
        <textarea
          id={`${id}-text`}
          rows={4}
          disabled={state.fileName !== null}
          className="block w-full rounded-md border border-rule p-2 font-mono text-xs disabled:bg-paper"
          value={state.pasted}
          onChange={(e) => state.setPasted(e.target.value)}
          placeholder={placeholder}
        />
      </div>
    </>
  );
}

// The bulletin editor: a toolbar and the TipTap document (starter kit, tables, links, images, and Tocsin's figure
// nodes). The parent owns saving; this component reports every change and exposes the editor for set-content.
import { EditorContent, useEditor, useEditorState, type Editor } from '@tiptap/react';
import { useEffect, useState, type ReactNode } from 'react';
import type { BulletinDocument } from '../../shared/bulletins/document';
import { bulletinExtensions } from './extensions';
import { FigureSourceContext, type FigureSource } from './FigureSource';
import { InsertDialog, type InsertKind } from './InsertDialog';

export const DOC_CLASS =
  'prose-doc max-w-none text-[1.02rem] [&_h2]:mt-6 [&_h2]:mb-2 [&_h2]:text-xl [&_h2]:font-bold [&_h3]:mt-4 [&_h3]:mb-1 [&_h3]:text-lg [&_h3]:font-bold ' +
  '[&_p]:my-2 [&_ul]:my-2 [&_ul]:list-disc [&_ul]:pl-6 [&_ol]:my-2 [&_ol]:list-decimal [&_ol]:pl-6 [&_blockquote]:border-l-4 [&_blockquote]:border-rule [&_blockquote]:pl-4 [&_blockquote]:text-ink-soft ' +
  '[&_table:not([data-testid=risk-table])]:my-3 [&_table:not([data-testid=risk-table])]:border-collapse [&_td]:border [&_td]:border-rule [&_td]:px-2 [&_td]:py-1 [&_th]:border [&_th]:border-rule [&_th]:bg-accent-50 [&_th]:px-2 [&_th]:py-1 ' +
  '[&_img]:my-3 [&_img]:max-w-full [&_hr]:my-4 [&_hr]:border-rule';

function ToolButton({ label, active, onClick, children, disabled }: { label: string; active?: boolean; onClick: () => void; children: ReactNode; disabled?: boolean }) {
  return (
    <button
      type="button"
      aria-label={label}
      title={label}
      aria-pressed={active === undefined ? undefined : active}
      disabled={disabled}
      onMouseDown={(e) => e.preventDefault()}
      onClick={onClick}
      className={`min-w-8 rounded px-2 py-1 text-sm font-medium transition-colors disabled:opacity-40 ${active ? 'bg-accent-700 text-white' : 'text-ink hover:bg-accent-50'}`}
    >
      {children}
    </button>
  );
}

const Sep = () => <span aria-hidden="true" className="mx-1 h-5 w-px bg-rule" />;

function Toolbar({ editor, onInsert }: { editor: Editor; onInsert: (k: InsertKind) => void }) {
  const s = useEditorState({
    editor,
    selector: ({ editor: e }) => ({
      bold: e.isActive('bold'),
      italic: e.isActive('italic'),
      h2: e.isActive('heading', { level: 2 }),
      h3: e.isActive('heading', { level: 3 }),
      bullet: e.isActive('bulletList'),
      ordered: e.isActive('orderedList'),
      link: e.isActive('link'),
      inTable: e.isActive('table'),
    }),
  });
  const chain = () => editor.chain().focus();
  return (
    <div role="toolbar" aria-label="Formatting" className="sticky top-0 z-10 flex flex-wrap items-center gap-0.5 border-b border-rule bg-white/95 px-2 py-1.5 backdrop-blur">
      <ToolButton label="Bold" active={s.bold} onClick={() => chain().toggleBold().run()}>
        <b>B</b>
      </ToolButton>
      <ToolButton label="Italic" active={s.italic} onClick={() => chain().toggleItalic().run()}>
        <i>I</i>
      </ToolButton>
      <Sep />
      <ToolButton label="Heading" active={s.h2} onClick={() => chain().toggleHeading({ level: 2 }).run()}>
        H2
      </ToolButton>
      <ToolButton label="Subheading" active={s.h3} onClick={() => chain().toggleHeading({ level: 3 }).run()}>
        H3
      </ToolButton>
      <ToolButton label="Bulleted list" active={s.bullet} onClick={() => chain().toggleBulletList().run()}>
        • List
      </ToolButton>
      <ToolButton label="Numbered list" active={s.ordered} onClick={() => chain().toggleOrderedList().run()}>
        1. List
      </ToolButton>
      <Sep />
      <ToolButton
        label={s.link ? 'Remove link' : 'Link'}
        active={s.link}
        onClick={() => {
          if (s.link) return void chain().unsetLink().run();
          const href = window.prompt('Link address (https:// or mailto:)');
          if (href && /^(https?:|mailto:)/i.test(href.trim())) chain().setLink({ href: href.trim() }).run();
        }}
      >
        Link
      </ToolButton>
      <ToolButton
        label="Image"
        onClick={() => {
          const src = window.prompt('Image address (https://)');
          if (src && /^https?:/i.test(src.trim())) chain().setImage({ src: src.trim(), alt: window.prompt('Describe the image for readers who cannot see it') ?? '' }).run();
        }}
      >
        Image
      </ToolButton>
      <ToolButton label="Table" onClick={() => chain().insertTable({ rows: 3, cols: 3, withHeaderRow: true }).run()}>
        Table
      </ToolButton>
      {s.inTable && (
        <>
          <ToolButton label="Add row" onClick={() => chain().addRowAfter().run()}>
            + row
          </ToolButton>
          <ToolButton label="Add column" onClick={() => chain().addColumnAfter().run()}>
            + col
          </ToolButton>
          <ToolButton label="Delete table" onClick={() => chain().deleteTable().run()}>
            − table
          </ToolButton>
        </>
      )}
      <Sep />
      <ToolButton label="Insert figure" onClick={() => onInsert('figure')}>
        <span className="text-accent-700">+ Figure</span>
      </ToolButton>
      <ToolButton label="Insert risk table" onClick={() => onInsert('riskTable')}>
        <span className="text-accent-700">+ Risk table</span>
      </ToolButton>
      <ToolButton label="Insert plot" onClick={() => onInsert('plot')}>
        <span className="text-accent-700">+ Plot</span>
      </ToolButton>
    </div>
  );
}

type Props = {
  document: BulletinDocument;
  source: FigureSource;
  editable: boolean;
  onChange?: (doc: BulletinDocument) => void;
  onReady?: (editor: Editor) => void;
  label?: string;
};

export function BulletinEditor({ document, source, editable, onChange, onReady, label = 'Bulletin text' }: Props) {
  const [insert, setInsert] = useState<InsertKind | null>(null);
  const editor = useEditor({
    extensions: bulletinExtensions(),
    content: document,
    editable,
    immediatelyRender: true,
    shouldRerenderOnTransaction: false,
    editorProps: {
      attributes: {
        class: `${DOC_CLASS} min-h-64 px-6 py-5 outline-none`,
        'aria-label': label,
        'aria-multiline': 'true',
        role: 'textbox',
        'data-testid': 'bulletin-editor',
      },
    },
    onUpdate: ({ editor: e }) => onChange?.(e.getJSON() as BulletinDocument),
  });
  useEffect(() => {
    if (editor) onReady?.(editor);
  }, [editor, onReady]);
  useEffect(() => {
    editor?.setEditable(editable, false);
  }, [editor, editable]);

  return (
    <FigureSourceContext.Provider value={source}>
      <div className="rounded-lg border border-rule bg-white shadow-xs">
        {editable && editor && <Toolbar editor={editor} onInsert={setInsert} />}
        <EditorContent editor={editor} />
      </div>
      {editable && source.objectId !== null && (
        <InsertDialog
          kind={insert}
          objectId={source.objectId}
          onClose={() => setInsert(null)}
          onInsert={(c) => {
            setInsert(null);
            const chain = editor.chain().focus();
            if (c.kind === 'figure') chain.insertLinkedFigure(c.attrs).run();
            else if (c.kind === 'riskTable') chain.insertRiskTable(c.attrs).run();
            else chain.insertPlot(c.attrs).run();
          }}
        />
      )}
    </FigureSourceContext.Provider>
  );
}

/** A read-only rendering of a document (locked versions, briefings) with the same nodes. */
export function DocumentView({ document, source }: { document: BulletinDocument; source: FigureSource }) {
  const editor = useEditor({
    extensions: bulletinExtensions(),
    content: document,
    editable: false,
    immediatelyRender: true,
    editorProps: { attributes: { class: `${DOC_CLASS} px-1 py-1`, 'data-testid': 'document-view' } },
  });
  useEffect(() => {
    if (editor && JSON.stringify(editor.getJSON()) !== JSON.stringify(document)) editor.commands.setContent(document, { emitUpdate: false });
  }, [editor, document]);
  return (
    <FigureSourceContext.Provider value={source}>
      <EditorContent editor={editor} />
    </FigureSourceContext.Provider>
  );
}

// The editor's extensions: the starter kit (with its link mark set to safe protocols), tables, images, and
// Tocsin's figure nodes. One list for the live editor and the read-only viewer, so both parse the same documents.
import type { Extensions } from '@tiptap/core';
import { Image } from '@tiptap/extension-image';
import { TableKit } from '@tiptap/extension-table';
import { StarterKit } from '@tiptap/starter-kit';
import { LinkedFigure, Plot, RiskTable } from './nodes';

export function bulletinExtensions(): Extensions {
  return [
    StarterKit.configure({
      heading: { levels: [2, 3] },
      link: {
        openOnClick: false,
        autolink: true,
        defaultProtocol: 'https',
        // the server accepts http(s) and mailto links only (shared/bulletins/document.ts)
        isAllowedUri: (url) => /^(https?:|mailto:)/i.test(url),
      },
    }),
    TableKit.configure({ table: { resizable: false } }),
    Image.configure({ inline: false }),
    LinkedFigure,
    RiskTable,
    Plot,
  ];
}

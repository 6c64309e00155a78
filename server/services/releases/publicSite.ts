// The public site of published releases: JSON (/api/public/releases), server-rendered HTML pages (/public,
// /public/releases/:slug) and an Atom 1.0 feed (RFC 4287, /public/feed.atom). Everything here is built from
// ReleaseService.published()/publishedBySlug(), which only ever return releases in state 'published': drafts,
// scheduled (embargoed) and cancelled releases cannot reach this module.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { PLAIN_LABELS } from '../../../shared/releases/plainLanguage';
import type { PublicRelease, PublicReleaseListResponse, PublicReleaseSummary, ReleaseVersion } from '../../../shared/schemas/releases';
import type { ReleaseRow } from '../../db/schema';
import { notFound } from '../../errors';
import { escapeHtml, releaseDocumentHtml, releaseDocumentText } from './document';
import type { ReleaseService } from './service';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');
let cssCache: string | null = null;
export function publicCss(): string {
  cssCache ??= fs.readFileSync(path.join(ROOT, 'templates/public/site.css'), 'utf8');
  return cssCache;
}

const pageUrl = (slug: string) => `/public/releases/${encodeURIComponent(slug)}`;

function summaryOf(row: ReleaseRow, v: ReleaseVersion): PublicReleaseSummary {
  return {
    slug: row.slug!,
    number: row.number,
    title: v.title,
    summary: v.summary,
    objectDesignation: v.source.objectDesignation,
    publishedAt: row.publishedAt!.toISOString(),
    url: pageUrl(row.slug!),
  };
}

function fullOf(row: ReleaseRow, v: ReleaseVersion): PublicRelease {
  const plainByIndex = new Map(v.plainLanguage.statements.map((s) => [s.figureIndex, s.text]));
  return {
    ...summaryOf(row, v),
    version: v.version,
    text: releaseDocumentText(v.document, v.figures),
    html: releaseDocumentHtml(v.document, v.figures),
    figures: v.figures.map((f) => ({ label: PLAIN_LABELS[f.value.quantity] ?? f.value.quantity, text: f.value.text, plain: plainByIndex.get(f.index) ?? null })),
    plainLanguage: v.plainLanguage,
  };
}

/** "2 December 2026, 14:00 UTC". */
export function publicDate(d: Date): string {
  const months = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
  return `${d.getUTCDate()} ${months[d.getUTCMonth()]} ${d.getUTCFullYear()}, ${String(d.getUTCHours()).padStart(2, '0')}:${String(d.getUTCMinutes()).padStart(2, '0')} UTC`;
}

function layout(args: { title: string; officeName: string; body: string }): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(args.title)}</title>
<link rel="stylesheet" href="/public/site.css">
<link rel="alternate" type="application/atom+xml" title="${escapeHtml(args.officeName)}: press releases" href="/public/feed.atom">
</head>
<body>
<a class="skip-link" href="#main">Skip to the content</a>
<header class="site">
<p>${escapeHtml(args.officeName)}</p>
<nav aria-label="Public site"><a href="/public">Press releases</a><a href="/public/feed.atom">Atom feed</a></nav>
</header>
<main id="main">
${args.body}
</main>
<footer class="site"><p>Published by ${escapeHtml(args.officeName)}. Times are in UTC. Figures on this site are analysis aids; official impact-risk statements come from the responsible national and international authorities.</p></footer>
</body>
</html>
`;
}

export function createPublicSite(releases: ReleaseService, opts: { officeName: () => string; publicUrl: string }) {
  return {
    list(): PublicReleaseListResponse {
      return { releases: releases.published().map(({ row, version }) => summaryOf(row, version)) };
    },

    get(slug: string): PublicRelease {
      const found = releases.publishedBySlug(slug);
      if (!found) throw notFound('No such release');
      return fullOf(found.row, found.version);
    },

    listPage(): string {
      const office = opts.officeName();
      const items = releases.published();
      const body = items.length
        ? `<ol class="releases">${items
            .map(({ row, version }) => {
              const s = summaryOf(row, version);
              return `<li><article><h2><a href="${escapeHtml(s.url)}">${escapeHtml(s.title)}</a></h2><p class="meta"><time datetime="${s.publishedAt}">${escapeHtml(publicDate(row.publishedAt!))}</time> · ${escapeHtml(s.number)} · ${escapeHtml(s.objectDesignation)}</p>${s.summary ? `<p>${escapeHtml(s.summary)}</p>` : ''}</article></li>`;
            })
            .join('\n')}</ol>`
        : '<p>No press releases have been published yet.</p>';
      return layout({ title: `Press releases · ${office}`, officeName: office, body: `<h1>Press releases</h1>\n${body}` });
    },

    releasePage(slug: string): string | null {
      const found = releases.publishedBySlug(slug);
      if (!found) return null;
      const office = opts.officeName();
      const r = fullOf(found.row, found.version);
      const plain = r.figures
        .filter((f) => f.plain)
        .map((f) => `<dt>${escapeHtml(f.label)}</dt><dd>${escapeHtml(f.plain!)}<span class="exact">Figure as assessed: <span class="figure">${escapeHtml(f.text)}</span></span></dd>`)
        .join('\n');
      const body = `<article>
<h1>${escapeHtml(r.title)}</h1>
<p class="meta">Press release ${escapeHtml(r.number)} · published <time datetime="${r.publishedAt}">${escapeHtml(publicDate(found.row.publishedAt!))}</time> · object ${escapeHtml(r.objectDesignation)}</p>
${r.summary ? `<p class="summary">${escapeHtml(r.summary)}</p>` : ''}
${r.html}
${plain ? `<section aria-labelledby="plain-h"><h2 id="plain-h">The figures in plain words</h2>\n<dl class="plain">\n${plain}\n</dl>\n<p>${escapeHtml(r.plainLanguage.uncertainty)}</p></section>` : `<p>${escapeHtml(r.plainLanguage.uncertainty)}</p>`}
<aside class="caution" aria-label="Please note"><p><strong>Please note.</strong> ${escapeHtml(r.plainLanguage.caution)}</p></aside>
<p class="no-print"><a href="/public">All press releases</a></p>
</article>`;
      return layout({ title: `${r.title} · ${office}`, officeName: office, body });
    },

    notFoundPage(): string {
      const office = opts.officeName();
      return layout({ title: `Not found · ${office}`, officeName: office, body: '<h1>Not found</h1><p>There is no published press release at this address.</p><p><a href="/public">All press releases</a></p>' });
    },

    /** Atom 1.0 feed (RFC 4287) of published releases, newest first. */
    feed(): string {
      const office = opts.officeName();
      const base = opts.publicUrl;
      const items = releases.published();
      const updated = items.length ? items[0].row.publishedAt!.toISOString() : new Date(0).toISOString();
      const x = escapeHtml;
      const entries = items
        .map(({ row, version }) => {
          const r = fullOf(row, version);
          const link = `${base}${r.url}`;
          const content = `${r.summary ? `<p><strong>${x(r.summary)}</strong></p>` : ''}${r.html}<p>${x(r.plainLanguage.uncertainty)}</p><p><em>${x(r.plainLanguage.caution)}</em></p>`;
          return `  <entry>
    <id>${x(link)}</id>
    <title>${x(r.title)}</title>
    <link rel="alternate" type="text/html" href="${x(link)}"/>
    <published>${r.publishedAt}</published>
    <updated>${r.publishedAt}</updated>
    <summary>${x(r.summary || r.plainLanguage.uncertainty)}</summary>
    <content type="html">${x(content)}</content>
  </entry>`;
        })
        .join('\n');
      return `<?xml version="1.0" encoding="utf-8"?>
<feed xmlns="http://www.w3.org/2005/Atom">
  <id>${x(`${base}/public/feed.atom`)}</id>
  <title>${x(office)}: press releases</title>
  <updated>${updated}</updated>
  <author><name>${x(office)}</name></author>
  <link rel="self" type="application/atom+xml" href="${x(`${base}/public/feed.atom`)}"/>
  <link rel="alternate" type="text/html" href="${x(`${base}/public`)}"/>
${entries}
</feed>
`;
    },
  };
}
export type PublicSite = ReturnType<typeof createPublicSite>;

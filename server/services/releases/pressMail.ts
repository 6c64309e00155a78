// The press-list e-mail of a published release (plain text and HTML), written to the outbox at publication.
import type { ReleaseVersion } from '../../../shared/schemas/releases';
import type { OutgoingMail } from '../mail';
import { escapeHtml, releaseDocumentHtml, releaseDocumentText } from './document';

export function pressMail(args: { to: { email: string; name: string }; release: ReleaseVersion; slug: string; publishedAt: Date; publicUrl: string; officeName: string }): OutgoingMail {
  const { release: v, slug, officeName } = args;
  const url = `${args.publicUrl}/public/releases/${encodeURIComponent(slug)}`;
  const published = `${args.publishedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
  const statements = v.plainLanguage.statements.map((s) => `- ${s.label}: ${s.text}`).join('\n');
  const text = [
    `${officeName}: press release ${v.number}`,
    `Published ${published}`,
    '',
    v.title,
    '',
    ...(v.summary ? [v.summary, ''] : []),
    releaseDocumentText(v.document, v.figures),
    '',
    'In plain words:',
    statements,
    '',
    v.plainLanguage.uncertainty,
    '',
    v.plainLanguage.caution,
    '',
    `Online: ${url}`,
  ].join('\n');
  const html = `<!doctype html><html lang="en"><body>
<p>${escapeHtml(officeName)}: press release ${escapeHtml(v.number)}, published ${escapeHtml(published)}</p>
<h1>${escapeHtml(v.title)}</h1>
${v.summary ? `<p><strong>${escapeHtml(v.summary)}</strong></p>` : ''}
${releaseDocumentHtml(v.document, v.figures)}
<h2>In plain words</h2>
<ul>${v.plainLanguage.statements.map((s) => `<li>${escapeHtml(s.label)}: ${escapeHtml(s.text)}</li>`).join('')}</ul>
<p>${escapeHtml(v.plainLanguage.uncertainty)}</p>
<p><em>${escapeHtml(v.plainLanguage.caution)}</em></p>
<p><a href="${escapeHtml(url)}">${escapeHtml(url)}</a></p>
</body></html>`;
  return { to: args.to.email, subject: `Press release ${v.number}: ${v.title}`, text, html };
}

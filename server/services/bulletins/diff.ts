// Readable differences between two bulletin versions: a line diff of the document text (figures written as their
// frozen values, so a changed number shows in the text too) and a figure-by-figure comparison.
import { documentText, FIGURE_MATCH_DAYS } from '../../../shared/bulletins/document';
import type { BulletinVersion, FigureDiff, VersionDiff } from '../../../shared/schemas/bulletins';

type Op = { op: 'equal' | 'insert' | 'delete'; text: string };

/** Line diff by longest common subsequence (documents are short: a few hundred lines at most). */
export function diffLines(before: string[], after: string[]): Op[] {
  const n = before.length;
  const m = after.length;
  const lcs: number[][] = Array.from({ length: n + 1 }, () => new Array<number>(m + 1).fill(0));
  for (let i = n - 1; i >= 0; i--) for (let j = m - 1; j >= 0; j--) lcs[i][j] = before[i] === after[j] ? lcs[i + 1][j + 1] + 1 : Math.max(lcs[i + 1][j], lcs[i][j + 1]);
  const ops: Op[] = [];
  let i = 0;
  let j = 0;
  while (i < n && j < m) {
    if (before[i] === after[j]) {
      ops.push({ op: 'equal', text: before[i] });
      i++;
      j++;
    } else if (lcs[i + 1][j] >= lcs[i][j + 1]) ops.push({ op: 'delete', text: before[i++] });
    else ops.push({ op: 'insert', text: after[j++] });
  }
  while (i < n) ops.push({ op: 'delete', text: before[i++] });
  while (j < m) ops.push({ op: 'insert', text: after[j++] });
  return ops;
}

/** The document text of a version with each figure written as «value». */
export function versionText(v: Pick<BulletinVersion, 'document' | 'figures'>): string {
  return documentText(v.document, (index) => `«${v.figures.find((f) => f.index === index)?.value.text ?? '?'}»`);
}

export function diffVersions(older: BulletinVersion, newer: BulletinVersion): VersionDiff {
  const text = diffLines(versionText(older).split('\n'), versionText(newer).split('\n'));
  const used = new Set<number>();
  const figures: FigureDiff[] = [];
  for (const f of newer.figures) {
    const match = older.figures.find(
      (o) =>
        !used.has(o.index) &&
        o.attrs.quantity === f.attrs.quantity &&
        o.attrs.body === f.attrs.body &&
        (o.attrs.epochTdbJd === null || f.attrs.epochTdbJd === null ? o.attrs.epochTdbJd === f.attrs.epochTdbJd : Math.abs(o.attrs.epochTdbJd - f.attrs.epochTdbJd) <= FIGURE_MATCH_DAYS),
    );
    if (!match) {
      figures.push({ index: f.index, previousIndex: null, quantity: f.attrs.quantity, change: 'added', before: null, after: f.value });
      continue;
    }
    used.add(match.index);
    const change = match.value.text !== f.value.text ? 'changed' : match.attrs.runId !== f.attrs.runId ? 'rebound' : 'unchanged';
    figures.push({ index: f.index, previousIndex: match.index, quantity: f.attrs.quantity, change, before: match.value, after: f.value });
  }
  for (const o of older.figures) {
    if (!used.has(o.index)) figures.push({ index: null, previousIndex: o.index, quantity: o.attrs.quantity, change: 'removed', before: o.value, after: null });
  }
  return { against: older.version, title: older.title === newer.title ? null : { before: older.title, after: newer.title }, text, figures };
}

// Sending an approved version to a stakeholder list, and each distribution's per-recipient delivery and
// acknowledgement (polled while deliveries are pending).
import { useState } from 'react';
import { STAKEHOLDER_KIND_LABELS, type Distribution } from '../../../shared/schemas/bulletins';
import { formatUtc } from '../../../shared/format';
import { useCreateDistribution, useDistributions } from '../../api/distributions';
import { useStakeholderLists } from '../../api/stakeholderLists';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { SelectField } from '../../components/ui';

export function DistributeDialog({ bulletinId, version, open, onClose }: { bulletinId: number; version: number; open: boolean; onClose: () => void }) {
  const lists = useStakeholderLists(open);
  const create = useCreateDistribution();
  const [listId, setListId] = useState('');
  const list = lists.data?.find((l) => String(l.id) === listId);
  return (
    <ConfirmDialog
      open={open}
      title={`Distribute version ${version}`}
      confirmLabel="Send"
      busy={create.isPending}
      confirmDisabled={!list}
      error={create.error}
      onCancel={() => {
        create.reset();
        onClose();
      }}
      onConfirm={() => list && create.mutate({ bulletinId, version, listId: list.id }, { onSuccess: onClose })}
    >
      <p>Each recipient gets the PDF of this version with a short summary by e-mail; Tocsin users also find it in their briefing inbox.</p>
      <SelectField label="Stakeholder list" value={listId} onChange={(e) => setListId(e.target.value)}>
        <option value="">Choose…</option>
        {(lists.data ?? []).map((l) => (
          <option key={l.id} value={l.id}>
            {l.name} · {STAKEHOLDER_KIND_LABELS[l.kind]} · {l.members.length} recipient{l.members.length === 1 ? '' : 's'}
          </option>
        ))}
      </SelectField>
      {list && (
        <ul className="max-h-40 list-disc overflow-auto pl-5 text-xs">
          {list.members.map((m) => (
            <li key={m.id}>
              {m.name} &lt;{m.email}&gt;
            </li>
          ))}
        </ul>
      )}
    </ConfirmDialog>
  );
}

const STATUS_TONES = { pending: 'text-ink-soft', sent: 'text-ok-700', failed: 'text-danger-700' } as const;

function DistributionCard({ d }: { d: Distribution }) {
  return (
    <div className="rounded-lg border border-rule bg-white" data-testid={`distribution-${d.id}`}>
      <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-rule px-4 py-2.5">
        <p className="text-sm font-medium">
          Version {d.version} to {d.list.name}
        </p>
        <p className="text-xs text-ink-soft">
          {formatUtc(d.createdAt, { seconds: false })}
          {d.sentBy && ` by ${d.sentBy.name}`} · {d.counts.sent} of {d.counts.total} sent · {d.counts.acknowledged} acknowledged
          {d.counts.failed > 0 && <span className="text-danger-700"> · {d.counts.failed} failed</span>}
        </p>
      </div>
      <table className="w-full text-left text-sm">
        <thead className="text-xs text-ink-soft">
          <tr>
            <th scope="col" className="px-4 py-1.5 font-medium">Recipient</th>
            <th scope="col" className="px-4 py-1.5 font-medium">E-mail</th>
            <th scope="col" className="px-4 py-1.5 font-medium">Acknowledged</th>
          </tr>
        </thead>
        <tbody>
          {d.recipients.map((r) => (
            <tr key={r.id} className="border-t border-rule align-top">
              <td className="px-4 py-1.5">
                {r.name}
                <span className="block text-xs text-ink-soft">{r.email}</span>
              </td>
              <td className={`px-4 py-1.5 ${STATUS_TONES[r.status]}`}>
                {r.status === 'sent' ? `sent ${formatUtc(r.sentAt, { seconds: false })}` : r.status}
                {r.status !== 'sent' && r.attempts > 0 && <span className="block text-xs">{r.attempts} attempt{r.attempts === 1 ? '' : 's'}{r.lastError ? `: ${r.lastError}` : ''}</span>}
              </td>
              <td className="px-4 py-1.5">
                {r.acknowledgedAt ? (
                  <span className="text-ok-700">
                    ✓ {formatUtc(r.acknowledgedAt, { seconds: false })}
                    {r.acknowledgeComment && <span className="block text-xs text-ink-soft">“{r.acknowledgeComment}”</span>}
                  </span>
                ) : r.userId === null ? (
                  <span className="text-ink-soft">outside address</span>
                ) : (
                  <span className="text-signal-700">not yet</span>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function DistributionsSection({ bulletinId }: { bulletinId: number }) {
  const q = useDistributions(bulletinId);
  if (!q.data || q.data.length === 0) return null;
  return (
    <section aria-labelledby="distributions-heading" className="space-y-3">
      <h2 id="distributions-heading" className="text-lg font-semibold">
        Distribution
      </h2>
      {q.data.map((d) => (
        <DistributionCard key={d.id} d={d} />
      ))}
    </section>
  );
}

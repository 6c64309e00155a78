// Outside recipients of a stakeholder list typed as text: one per line, in the RFC 5322 §3.4 name-addr form
// "Display Name <local@domain>" or a bare addr-spec. A deliberately small reading (no quoted names, comments or
// groups): what it cannot read is reported line by line instead of guessed.
import type { StakeholderMemberInput } from '../../../shared/schemas/bulletins';

export function parseOutsideAddresses(text: string): { members: StakeholderMemberInput[]; bad: string[] } {
  const members: StakeholderMemberInput[] = [];
  const bad: string[] = [];
  for (const raw of text.split('\n')) {
    const line = raw.trim();
    if (!line) continue;
    const m = /^([^<>]*?)\s*<([^<>\s@]+@[^<>\s@]+\.[^<>\s@]+)>$/.exec(line) ?? /^()([^<>\s@]+@[^<>\s@]+\.[^<>\s@]+)$/.exec(line);
    if (!m) bad.push(line);
    else members.push({ email: m[2], name: m[1].trim() || m[2] });
  }
  return { members, bad };
}

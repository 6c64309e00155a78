// Reading outside recipients typed on the stakeholder-list form. Forms checked: RFC 5322 §3.4 name-addr
// ("Display Name <addr-spec>") and a bare addr-spec; anything else is reported, not guessed.
import { describe, expect, it } from 'vitest';
import { parseOutsideAddresses } from '../../src/pages/bulletins/addresses';

describe('parseOutsideAddresses', () => {
  it('reads name-addr and bare addr-spec lines, skipping blank lines', () => {
    const r = parseOutsideAddresses('Partner duty desk <duty@partner.example>\n\n  ops@office.example  \n');
    expect(r.bad).toEqual([]);
    expect(r.members).toEqual([
      { name: 'Partner duty desk', email: 'duty@partner.example' },
      { name: 'ops@office.example', email: 'ops@office.example' },
    ]);
  });

  it('reports lines it cannot read instead of guessing', () => {
    const r = parseOutsideAddresses('not an address\nTwo <a@b.example> <c@d.example>\nNo domain <user@localhost>\nok@fine.example');
    expect(r.bad).toEqual(['not an address', 'Two <a@b.example> <c@d.example>', 'No domain <user@localhost>']);
    expect(r.members).toEqual([{ name: 'ok@fine.example', email: 'ok@fine.example' }]);
  });
});

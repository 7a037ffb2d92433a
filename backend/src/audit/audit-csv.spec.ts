import { describe, expect, it } from 'vitest';
import { auditCsv, neutraliseFormula } from './audit-csv';

describe('audit CSV', () => {
  it('neutralises every formula prefix', () => {
    for (const value of ['=1+1', '+SUM(A1)', '-2', '@cmd', '\tx', '\rx']) {
      expect(neutraliseFormula(value)).toBe(`'${value}`);
    }
    expect(neutraliseFormula('advisor@halden.example')).toBe('advisor@halden.example');
  });

  it('quotes fields holding commas, quotes and line breaks', () => {
    const csv = auditCsv([
      {
        id: '1',
        at: '2026-03-01T10:00:00.000Z',
        actorId: null,
        actorEmail: '=HYPERLINK("x")',
        action: 'auth.sign_in_failed',
        target: null,
        targetLabel: null,
        detail: { reason: 'a,"b"\nc' },
      },
    ]);
    const [header, row] = csv.split('\r\n');
    expect(header).toBe('"at","actor_email","actor_id","action","target","detail","target_label"');
    expect(row).toContain(`"'=HYPERLINK(""x"")"`);
    expect(csv).toContain('""reason"":""a,\\""b\\""\\nc""');
  });
});

import type { ElectiveEstimate } from '@kinpath/contracts';
import { ESTIMATE_CAUTIONS } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { composeSummary } from './summary-text';

const base: ElectiveEstimate = {
  courseCode: 'ART 2210',
  title: 'Photography',
  department: 'ART',
  credits: 3,
  offered: true,
  eligible: true,
  ineligibleReasons: [],
  predictedGrade: 3.2838,
  predictedGradeLetter: 'B+',
  predictedSatisfaction: 3.717,
  fit: 75.01,
  fitBasis: 'both',
  confidence: 'medium',
  basis: 'neighbours',
  bases: { grade: 'neighbours', satisfaction: 'neighbours' },
  neighbours: { grade: 30, satisfaction: 28 },
  kinStrength: { grade: 9.2, satisfaction: 7.5 },
  likelyRange: {
    grade: { low: 2.8, high: 3.7, lowLabel: 'B-', highLabel: 'A-' },
    satisfaction: { low: 2.9, high: 4.6, lowLabel: '2.9', highLabel: '4.6' },
  },
};

describe('the advising summary e-mail', () => {
  const mail = composeSummary({
    term: '2026-FA',
    advisorName: 'Halden advisor',
    advisorEmail: 'advisor@halden.example',
    message: 'Good to see you <today>.',
    electives: [
      base,
      {
        ...base,
        courseCode: 'MUS 3310',
        title: 'Composition',
        predictedGrade: 2.9,
        predictedGradeLetter: 'B',
        predictedSatisfaction: null,
        fit: 72.5,
        fitBasis: 'grade',
        confidence: 'low',
        basis: 'baseline',
        bases: { grade: 'baseline', satisfaction: 'none' },
        neighbours: { grade: 2, satisfaction: 0 },
        kinStrength: { grade: 0, satisfaction: 0 },
        likelyRange: { grade: null, satisfaction: null },
        eligible: false,
        ineligibleReasons: [
          { code: 'prerequisite_not_passed', message: 'Prerequisite not passed: MUS 2210.' },
        ],
      },
    ],
  });

  it('gives each estimate with its kin count, and says when the baseline serves instead', () => {
    expect(mail.subject).toBe('Your elective shortlist for 2026-FA');
    expect(mail.text).toContain(
      'Expected grade: about B+ (3.28 grade points), likely B- to A-, based on 30 similar past students.',
    );
    expect(mail.text).toContain(
      // The screen's rule: two decimals, as the student page shows 3.72.
      'Expected satisfaction: 3.72 out of 5, likely 2.9 to 4.6, based on 28 similar past students.',
    );
    expect(mail.text).toContain('Fit: 75 out of 100 (confidence: medium).');
    expect(mail.text).toContain(
      "based on the course's overall results, as too few similar past students took it",
    );
    expect(mail.text).toContain('Expected satisfaction: no estimate');
    expect(mail.text).toContain('Please note: Prerequisite not passed: MUS 2210.');
  });

  it('carries every caution, in the text and the HTML, and escapes the advisor’s words', () => {
    for (const caution of ESTIMATE_CAUTIONS) expect(mail.text).toContain(caution);
    expect(mail.html).toContain('About these estimates');
    expect(mail.html).toContain('Good to see you &lt;today&gt;.');
    expect(mail.html).not.toContain('<today>');
  });
});

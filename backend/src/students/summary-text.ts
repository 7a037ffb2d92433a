import type { ElectiveEstimate, LikelyRange } from '@kinpath/contracts';
import {
  ESTIMATE_CAUTION_TITLE,
  ESTIMATE_CAUTIONS,
  gradePointsText,
  satisfactionText,
} from '@kinpath/contracts';

export interface SummaryInput {
  term: string;
  advisorName: string;
  advisorEmail: string;
  message: string | null;
  electives: readonly ElectiveEstimate[];
}

export interface SummaryMail {
  subject: string;
  text: string;
  html: string;
}

function kin(n: number): string {
  return `${n} similar past ${n === 1 ? 'student' : 'students'}`;
}

/** The plain-language lines for one elective; estimates always name what they rest on. */
export function electiveLines(e: ElectiveEstimate): string[] {
  const credits = e.credits === null ? '' : `, ${e.credits} credits`;
  const lines = [`${e.courseCode} ${e.title} (${e.department}${credits})`];
  // The 80 % likely range, when the last completed term gave one.
  const likely = (r: LikelyRange | null) =>
    r
      ? r.lowLabel === r.highLabel
        ? `, likely ${r.lowLabel}`
        : `, likely ${r.lowLabel} to ${r.highLabel}`
      : '';
  const basis = (b: ElectiveEstimate['basis'], n: number) =>
    b === 'neighbours'
      ? `based on ${kin(n)}`
      : "based on the course's overall results, as too few similar past students took it";
  if (e.predictedGrade === null) {
    lines.push('Expected grade: no estimate, as there are no past results for this course.');
  } else {
    lines.push(
      `Expected grade: about ${e.predictedGradeLetter} (${gradePointsText(e.predictedGrade)} grade points)${likely(e.likelyRange.grade)}, ${basis(e.bases.grade, e.neighbours.grade)}.`,
    );
  }
  if (e.predictedSatisfaction === null) {
    lines.push('Expected satisfaction: no estimate, as there are no past answers for this course.');
  } else {
    lines.push(
      `Expected satisfaction: ${satisfactionText(e.predictedSatisfaction)} out of 5${likely(e.likelyRange.satisfaction)}, ${basis(e.bases.satisfaction, e.neighbours.satisfaction)}.`,
    );
  }
  if (e.fit !== null) {
    lines.push(`Fit: ${Math.round(e.fit)} out of 100 (confidence: ${e.confidence}).`);
  }
  for (const reason of e.ineligibleReasons) lines.push(`Please note: ${reason.message}`);
  return lines;
}

function escapeHtml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/**
 * The advising summary a student receives: the advisor's words, each chosen
 * elective with its estimates and kin counts, and the cautions. It carries no
 * student number and nothing about any other student beyond counts.
 */
export function composeSummary(input: SummaryInput): SummaryMail {
  const subject = `Your elective shortlist for ${input.term}`;
  const intro = `Here are the electives we discussed for ${input.term}, with what Kinpath estimates from the records of past students whose courses resembled yours.`;
  const blocks = input.electives.map(electiveLines);
  const signature = `Sent by ${input.advisorName} (${input.advisorEmail}) with Kinpath. Reply to this e-mail with any questions.`;

  const text = [
    'Hello,',
    '',
    ...(input.message ? [input.message, ''] : []),
    intro,
    '',
    ...blocks.flatMap(([head, ...rest]) => [head, ...rest.map((l) => `  ${l}`), '']),
    ESTIMATE_CAUTION_TITLE,
    ...ESTIMATE_CAUTIONS.map((c) => `- ${c}`),
    '',
    signature,
    '',
  ].join('\n');

  const html = [
    '<!doctype html><html><body style="font-family: sans-serif; line-height: 1.5">',
    '<p>Hello,</p>',
    ...(input.message ? [`<p>${escapeHtml(input.message).replace(/\r?\n/g, '<br>')}</p>`] : []),
    `<p>${escapeHtml(intro)}</p>`,
    ...blocks.map(
      ([head, ...rest]) =>
        `<h3 style="margin-bottom: 0.2em">${escapeHtml(head)}</h3><ul>${rest.map((l) => `<li>${escapeHtml(l)}</li>`).join('')}</ul>`,
    ),
    `<h3>${escapeHtml(ESTIMATE_CAUTION_TITLE)}</h3>`,
    `<ul>${ESTIMATE_CAUTIONS.map((c) => `<li>${escapeHtml(c)}</li>`).join('')}</ul>`,
    `<p>${escapeHtml(signature)}</p>`,
    '</body></html>',
  ].join('\n');

  return { subject, text, html };
}

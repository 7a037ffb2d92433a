/**
 * The cautions of product.md, written once. Every screen, export and e-mail
 * that shows an estimate uses these words.
 */
export const ESTIMATE_CAUTION_TITLE = 'About these estimates';

export const ESTIMATE_CAUTIONS: readonly string[] = [
  "Estimates come from past students' records. They are advice for a conversation, not a decision about admission, placement or eligibility, and they can carry past patterns forward.",
  "Use them with the student, alongside the advisor's judgement.",
  'Follow the institution’s data-protection rules and the law that applies (FERPA in the United States, GDPR in the European Union) and local policy.',
];

/**
 * The cautions beside the demand outlook (department heads and registrar staff): the estimates
 * there are about how many students choose an elective, not about any one student.
 */
export const OUTLOOK_CAUTIONS: readonly string[] = [
  "Demand estimates come from past students' choices. They are advice for planning sections and seats, not a decision about any student, and they can carry past patterns forward.",
  'Use them alongside what the department knows and the records cannot show: new requirements, timetable clashes, a change of instructor.',
  'Follow the institution’s data-protection rules and the law that applies (FERPA in the United States, GDPR in the European Union) and local policy.',
];

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

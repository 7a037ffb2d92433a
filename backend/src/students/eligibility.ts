import type { IneligibleReason } from '@kinpath/contracts';
import type { CatalogueEntry } from '../model/model-snapshot';
import { formatPrerequisites, type PrerequisiteNode } from '../imports/validation/prerequisites';

/** The part of a prerequisite expression not yet met; null when it is met. */
export function unmetPrerequisites(
  node: PrerequisiteNode | null,
  passed: ReadonlySet<string>,
): PrerequisiteNode | null {
  if (!node) return null;
  if (node.type === 'course') return passed.has(node.code) ? null : node;
  if (node.type === 'or')
    return node.items.some((i) => !unmetPrerequisites(i, passed)) ? null : node;
  const unmet = node.items
    .map((i) => unmetPrerequisites(i, passed))
    .filter((i): i is PrerequisiteNode => i !== null);
  if (unmet.length === 0) return null;
  return unmet.length === 1 ? unmet[0] : { type: 'and', items: unmet };
}

/** Why the student cannot take the course in the term; empty when they can. */
export function ineligibleReasons(
  course: CatalogueEntry,
  passed: ReadonlySet<string>,
  offered: boolean,
  term: string,
): IneligibleReason[] {
  const reasons: IneligibleReason[] = [];
  if (passed.has(course.courseCode)) {
    reasons.push({ code: 'already_passed', message: 'Already passed.' });
  }
  const unmet = unmetPrerequisites(course.prerequisites, passed);
  if (unmet) {
    reasons.push({
      code: 'prerequisite_not_passed',
      message: `Prerequisite not passed: ${formatPrerequisites(unmet)}.`,
    });
  }
  if (!offered) reasons.push({ code: 'not_offered', message: `Not offered in ${term}.` });
  return reasons;
}

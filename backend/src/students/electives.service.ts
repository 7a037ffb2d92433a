import type {
  ElectiveEstimate,
  ElectiveExplanation,
  ElectivesResponse,
  EstimateBasis,
  GradeScaleLetter,
  LikelyRange,
  ModelSettings,
  SignalExplanation,
} from '@kinpath/contracts';
import { normalizeCourseCode } from '@kinpath/contracts';
import {
  applyRanges,
  confidenceOfWidth,
  explain,
  likelyRange,
  OUTCOME_DISCLOSURE_MIN,
  predictStudent,
  RANGE_CONFIDENCE_DESCRIPTION,
  type CoursePrediction,
  type Signal,
  type SignalPrediction,
} from '@kinpath/engine';
import { ConflictException, Injectable, NotFoundException } from '@nestjs/common';
import { AuditService } from '../audit/audit.service';
import { engineSettings } from '../model/engine-settings';
import type { CatalogueEntry, ModelSnapshot } from '../model/model-snapshot';
import { ModelSettingsService } from '../model/model-settings.service';
import { ModelService } from '../model/model.service';
import type { User } from '../users/entities/user.entity';
import { passedCourses, passRule, type PassRule } from './attempts';
import { ineligibleReasons } from './eligibility';
import { nearestLetter } from './grade-letters';
import { StudentsService } from './students.service';
import { auditAction, STUDENT_AUDIT } from './students-audit';

type Actor = Pick<User, 'id' | 'email'>;

/** Several signals' bases as one: kin only when every shown value comes from kin. */
export function overallBasis(bases: EstimateBasis[]): EstimateBasis {
  const shown = bases.filter((b) => b !== 'none');
  if (shown.length === 0) return 'none';
  return shown.every((b) => b === 'neighbours') ? 'neighbours' : 'baseline';
}

const SOURCE_WORDS: Record<ModelSettings['gradeSimilarity'], string> = {
  grade: 'grades',
  satisfaction: 'satisfaction answers',
  both: 'grades and satisfaction answers (the two likenesses averaged)',
  enrolment: 'which courses they took (withdrawals included)',
  'satisfaction+enrolment':
    'satisfaction answers and which courses they took (the two likenesses averaged)',
};

/** What an estimate rests on, for the explanation panel, in the settings' own terms. */
export function methodDescription(settings: ModelSettings): ElectiveExplanation['method'] {
  const centre =
    settings.centring === 'baseline'
      ? ' relative to the baseline (the overall average adjusted for the course and the student)'
      : settings.centring === 'studentMean'
        ? " centred on each student's own average"
        : '';
  const measure =
    settings.similarity === 'cosine'
      ? `Cosine similarity of results${centre}`
      : "Pearson correlation of results over shared courses, centred on each student's own average";
  const sources =
    settings.gradeSimilarity === settings.satisfactionSimilarity
      ? `, from ${SOURCE_WORDS[settings.gradeSimilarity]} for both estimates`
      : `; kin for the grade are found by ${SOURCE_WORDS[settings.gradeSimilarity]}, for satisfaction by ${SOURCE_WORDS[settings.satisfactionSimilarity]}`;
  const iuf = settings.iuf
    ? ', with inverse user frequency so that courses nearly everyone takes count for little (Breese, Heckerman & Kadie, 1998)'
    : '';
  const significance =
    settings.significance > 0
      ? `; similarities resting on fewer than ${settings.significance} shared courses are scaled down (Herlocker et al., 1999)`
      : '';
  const shrinkage =
    settings.shrinkage > 0
      ? `; each similarity is shrunk by n / (n + ${settings.shrinkage}) for n shared courses (Koren, 2010)`
      : '';
  const around =
    settings.centring === 'baseline'
      ? 'how each did in it compared with their own baseline, added to this student’s baseline'
      : 'how each did in it relative to their own average';
  return {
    name:
      settings.centring === 'baseline'
        ? 'User-based collaborative filtering around a baseline predictor (Koren, 2010; Resnick et al., 1994)'
        : 'User-based collaborative filtering with mean-centred weighted prediction (Resnick et al., 1994)',
    similarity: `${measure}${sources}${iuf}${significance}${shrinkage}.`,
    description:
      `Kinpath looks for past students whose results in the courses they shared with this student followed a similar pattern (their kin), takes up to ${settings.k} of the most similar who took this course, and combines ${around}, the more similar counting more. ` +
      `With fewer than ${settings.minNeighbours} kin it uses the baseline instead: the course's overall results adjusted for this student's record.`,
  };
}

/** A likely range with labels: grade letters for grades, one decimal for satisfaction. */
export function rangeOut(
  range: { low: number; high: number } | null | undefined,
  signal: Signal,
  letters: readonly GradeScaleLetter[],
): LikelyRange | null {
  if (!range) return null;
  const label = (v: number) =>
    signal === 'grade' ? (nearestLetter(v, letters) ?? v.toFixed(1)) : v.toFixed(1);
  return { ...range, lowLabel: label(range.low), highLabel: label(range.high) };
}

/**
 * Shares of the positive part of the kin's likeness (they add up to 1 over every course that
 * made the kin alike), the strongest five, and what the courses that pulled it down took
 * away as a share of that positive part.
 */
export function likenessShares(contributions: { course: string; contribution: number }[]): {
  top: { course: string; share: number }[];
  against: number;
} {
  let positive = 0;
  let negative = 0;
  for (const c of contributions) {
    if (c.contribution > 0) positive += c.contribution;
    else negative -= c.contribution;
  }
  if (positive <= 0) return { top: [], against: 0 };
  return {
    top: contributions
      .filter((c) => c.contribution > 0)
      .slice(0, 5)
      .map((c) => ({ course: c.course, share: c.contribution / positive })),
    against: negative / positive,
  };
}

function strengthOf(p: SignalPrediction): number {
  return p.basis === 'neighbours' ? (p.strength ?? 0) : 0;
}

/**
 * Estimates for one student from the model in force: every elective of the
 * catalogue with eligibility, and the explanation of one estimate.
 */
@Injectable()
export class ElectivesService {
  /** Pass rule and letters per model: the grade scale only changes with a rebuild. */
  private readonly scales = new WeakMap<
    ModelSnapshot,
    { rule: PassRule; letters: GradeScaleLetter[] }
  >();

  constructor(
    private readonly students: StudentsService,
    private readonly model: ModelService,
    private readonly settings: ModelSettingsService,
    private readonly audit: AuditService,
  ) {}

  async electives(
    ref: string,
    term: string | undefined,
    includeNotOffered: boolean,
    actor: Actor,
  ): Promise<ElectivesResponse> {
    const response = await this.estimates(ref, term, { includeNotOffered });
    await this.audit.record({
      actor,
      action: auditAction(STUDENT_AUDIT.electivesViewed),
      target: ref,
      detail: { term: response.term, settingsVersion: response.settingsVersion },
    });
    return response;
  }

  /**
   * Estimates for the student in the term: the electives offered in it (every
   * elective of the catalogue with `includeNotOffered`), or exactly `courseCodes`
   * (any catalogue course) when given.
   */
  async estimates(
    ref: string,
    requestedTerm: string | undefined,
    select: { courseCodes?: readonly string[]; includeNotOffered?: boolean } = {},
  ): Promise<ElectivesResponse> {
    const [snapshot, version] = await Promise.all([this.model.current(), this.settings.current()]);
    const { student, attempts } = await this.students.records(ref, snapshot);
    const term = requestedTerm ?? snapshot.terms.next;
    if (!term) {
      throw new ConflictException(
        'There is no term data yet, so there is no next term to plan for.',
      );
    }
    const offered = snapshot.offerings.get(term) ?? new Set<string>();
    const courses: CatalogueEntry[] = select.courseCodes
      ? select.courseCodes
          .map((code) => snapshot.courses.get(code))
          .filter((c): c is CatalogueEntry => c !== undefined)
      : select.includeNotOffered
        ? [...snapshot.electives]
        : snapshot.electives.filter((c) => offered.has(c.courseCode));
    const { rule, letters } = this.scaleOf(snapshot);
    const passed = passedCourses(attempts, rule);
    const prediction = applyRanges(
      snapshot.model,
      predictStudent(
        snapshot.model,
        student.pseudonym,
        courses.map((c) => c.courseCode),
        engineSettings(version.settings),
      ),
      this.model.ranges(snapshot, version),
    );
    const electives = courses.map((course, i) =>
      this.estimate(
        course,
        prediction.predictions[i],
        passed,
        offered.has(course.courseCode),
        term,
        letters,
      ),
    );
    return {
      term,
      settingsVersion: version.version,
      confidenceRule: RANGE_CONFIDENCE_DESCRIPTION,
      modelBuiltAt: snapshot.builtAt.toISOString(),
      electives,
    };
  }

  async explanation(ref: string, courseCodeParam: string): Promise<ElectiveExplanation> {
    const [snapshot, version] = await Promise.all([this.model.current(), this.settings.current()]);
    const { student } = await this.students.records(ref, snapshot);
    const code = normalizeCourseCode(courseCodeParam);
    const course = code ? snapshot.courses.get(code) : undefined;
    if (!course) throw new NotFoundException('This course is not in the catalogue.');
    const settings = engineSettings(version.settings);
    const { letters } = this.scaleOf(snapshot);
    const tables = this.model.ranges(snapshot, version);
    const a = snapshot.model.studentIndex.get(student.pseudonym) ?? -1;
    const signal = (s: Signal): SignalExplanation => {
      const e = explain(snapshot.model, student.pseudonym, course.courseCode, settings, s);
      const who = s === 'grade' ? 'grades' : 'answers';
      const d = snapshot.model.signals[s];
      const strength =
        e.basis === 'neighbours' ? e.kin.reduce((t, k) => t + Math.abs(k.similarity), 0) : 0;
      const range =
        e.value === null
          ? null
          : likelyRange(tables[s], e.value, a >= 0 ? d.rowPtr[a + 1] - d.rowPtr[a] : 0, strength);
      const shares = likenessShares(e.sharedCourses);
      // e.kin names the other students: it stays here, only counts and ranges leave.
      return {
        value: e.value,
        basis: e.basis,
        kinCount: e.neighbours,
        similarityRange: e.similarityRange,
        spread: e.spread,
        outcomes:
          e.outcomes?.map((o) => ({
            value: o.value,
            label:
              s === 'grade'
                ? (nearestLetter(o.value, letters) ?? String(o.value))
                : String(o.value),
            count: o.count,
          })) ?? null,
        outcomesSuppressed: e.outcomes
          ? null
          : e.neighbours === 0
            ? 'No similar past students took this course, so there are no results to show.'
            : `Only ${e.neighbours} similar past ${e.neighbours === 1 ? 'student' : 'students'} contributed; their results are shown from ${OUTCOME_DISCLOSURE_MIN} on, so that no one's ${who} can be inferred.`,
        sharedCourses: shares.top.map((c) => ({
          courseCode: c.course,
          title: snapshot.courses.get(c.course)?.title ?? c.course,
          contribution: c.share,
        })),
        againstShare: shares.against,
        kinStrength: strength,
        likelyRange: rangeOut(range, s, letters),
        confidence: range
          ? confidenceOfWidth(
              range.high - range.low,
              snapshot.model.scales[s] ?? {
                min: s === 'grade' ? 0 : 1,
                max: s === 'grade' ? 4 : 5,
              },
            )
          : 'low',
      };
    };
    return {
      courseCode: course.courseCode,
      title: course.title,
      settingsVersion: version.version,
      method: methodDescription(version.settings),
      disclosureMinimum: OUTCOME_DISCLOSURE_MIN,
      grade: signal('grade'),
      satisfaction: signal('satisfaction'),
    };
  }

  private estimate(
    course: CatalogueEntry,
    p: CoursePrediction,
    passed: ReadonlySet<string>,
    offered: boolean,
    term: string,
    letters: readonly GradeScaleLetter[],
  ): ElectiveEstimate {
    const reasons = ineligibleReasons(course, passed, offered, term);
    return {
      courseCode: course.courseCode,
      title: course.title,
      department: course.department,
      credits: course.credits,
      offered,
      eligible: reasons.length === 0,
      ineligibleReasons: reasons,
      predictedGrade: p.grade.value,
      predictedGradeLetter: nearestLetter(p.grade.value, letters),
      predictedSatisfaction: p.satisfaction.value,
      fit: p.fit,
      fitBasis: p.fitFrom,
      confidence: p.confidence,
      basis: overallBasis([p.grade.basis, p.satisfaction.basis]),
      bases: { grade: p.grade.basis, satisfaction: p.satisfaction.basis },
      neighbours: { grade: p.grade.neighbours, satisfaction: p.satisfaction.neighbours },
      kinStrength: { grade: strengthOf(p.grade), satisfaction: strengthOf(p.satisfaction) },
      likelyRange: {
        grade: rangeOut(p.grade.range, 'grade', letters),
        satisfaction: rangeOut(p.satisfaction.range, 'satisfaction', letters),
      },
    };
  }

  private scaleOf(snapshot: ModelSnapshot): { rule: PassRule; letters: GradeScaleLetter[] } {
    let scale = this.scales.get(snapshot);
    if (!scale) {
      scale = { rule: passRule(snapshot.scale), letters: snapshot.scale.toApi().letters };
      this.scales.set(snapshot, scale);
    }
    return scale;
  }
}

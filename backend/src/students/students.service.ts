import type {
  HistoryEntry,
  RecentStudent,
  StudentHeader,
  StudentLookupResponse,
  StudentStatus,
} from '@kinpath/contracts';
import { STUDENT_NOT_FOUND_MESSAGE } from '@kinpath/contracts';
import { Injectable, Logger, NotFoundException } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { AuditService } from '../audit/audit.service';
import type { ModelSnapshot } from '../model/model-snapshot';
import { ModelService } from '../model/model.service';
import { PseudonymService } from '../pseudonym/pseudonym.service';
import type { User } from '../users/entities/user.entity';
import { passRule, type Attempt } from './attempts';
import { standing } from './standing';
import { newRef, REF_PATTERN } from './student-refs';
import { auditAction, STUDENT_AUDIT } from './students-audit';

type Actor = Pick<User, 'id' | 'email'>;

/** A student found by ref: the pseudonym stays on the server. */
export interface KnownStudent {
  ref: string;
  pseudonym: string;
  program: string | null;
  entryTerm: string | null;
  status: StudentStatus;
}

/** A student and their attempts, as of one model. */
export interface StudentRecords {
  student: KnownStudent;
  attempts: Attempt[];
}

const RECENT_LIMIT = 12;
/** This many look-ups of unknown numbers by one user within the window raise an alert. */
export const LOOKUP_MISSES_ALERT = 20;
export const LOOKUP_MISSES_WINDOW_MINUTES = 10;
/** Students kept per model for the electives route; the oldest go first beyond this. */
const CACHED_STUDENTS = 5000;

function publicView(s: Omit<KnownStudent, 'pseudonym'>): StudentLookupResponse {
  return { ref: s.ref, program: s.program, status: s.status, entryTerm: s.entryTerm };
}

/**
 * Finding students: by number at the desk (the only place a number is handled,
 * and only for the length of the call), then by opaque ref.
 */
@Injectable()
export class StudentsService {
  /**
   * Records only change with term data, which makes a new model: per model, the
   * students advisors are looking at are read once, not on every electives request.
   */
  private readonly byModel = new WeakMap<ModelSnapshot, Map<string, StudentRecords>>();

  private readonly logger = new Logger(StudentsService.name);

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly pseudonyms: PseudonymService,
    private readonly audit: AuditService,
    private readonly model: ModelService,
  ) {}

  async lookup(studentId: string, actor: Actor): Promise<StudentLookupResponse> {
    const pseudonym = this.pseudonyms.pseudonymFor(studentId);
    const rows: { program: string | null; entry_term: string | null; status: StudentStatus }[] =
      await this.dataSource.query(
        `SELECT program, entry_term, status FROM students WHERE pseudonym = $1`,
        [pseudonym],
      );
    if (!rows[0]) {
      // Who tried, not what: repeated misses show up in the trail without any number.
      await this.audit.record({ actor, action: auditAction(STUDENT_AUDIT.lookupNotFound) });
      await this.alertOnManyMisses(actor);
      throw new NotFoundException(STUDENT_NOT_FOUND_MESSAGE);
    }
    // One ref per student, kept for good, so notes and shortlists follow the student.
    const refs: { ref: string }[] = await this.dataSource.query(
      `INSERT INTO student_refs (ref, pseudonym) VALUES ($1, $2)
       ON CONFLICT (pseudonym) DO UPDATE SET pseudonym = EXCLUDED.pseudonym
       RETURNING ref`,
      [newRef(), pseudonym],
    );
    const ref = refs[0].ref;
    await this.dataSource.query(
      `INSERT INTO student_lookups (user_id, student_ref) VALUES ($1, $2)
       ON CONFLICT (user_id, student_ref) DO UPDATE SET looked_up_at = now()`,
      [actor.id, ref],
    );
    await this.audit.record({ actor, action: auditAction(STUDENT_AUDIT.lookup), target: ref });
    return publicView({
      ref,
      program: rows[0].program,
      status: rows[0].status,
      entryTerm: rows[0].entry_term,
    });
  }

  /** Every LOOKUP_MISSES_ALERT misses within the window, one alert in the audit trail. */
  private async alertOnManyMisses(actor: Actor): Promise<void> {
    const since = new Date(Date.now() - LOOKUP_MISSES_WINDOW_MINUTES * 60_000);
    const misses = await this.audit.countSince(
      actor.id,
      auditAction(STUDENT_AUDIT.lookupNotFound),
      since,
    );
    if (misses === 0 || misses % LOOKUP_MISSES_ALERT !== 0) return;
    this.logger.warn(
      `One user looked up ${misses} unknown student numbers in ${LOOKUP_MISSES_WINDOW_MINUTES} minutes.`,
    );
    await this.audit.record({
      actor,
      action: auditAction(STUDENT_AUDIT.lookupMissesAlert),
      detail: { unknownLookups: misses, windowMinutes: LOOKUP_MISSES_WINDOW_MINUTES },
    });
  }

  async recent(actor: Actor): Promise<RecentStudent[]> {
    const rows: {
      ref: string;
      program: string | null;
      entry_term: string | null;
      status: StudentStatus;
      looked_up_at: Date;
    }[] = await this.dataSource.query(
      `SELECT l.student_ref AS ref, s.program, s.entry_term, s.status, l.looked_up_at
       FROM student_lookups l
       JOIN student_refs r ON r.ref = l.student_ref
       JOIN students s ON s.pseudonym = r.pseudonym
       WHERE l.user_id = $1
       ORDER BY l.looked_up_at DESC
       LIMIT ${RECENT_LIMIT}`,
      [actor.id],
    );
    return rows.map((r) => ({
      ...publicView({ ref: r.ref, program: r.program, status: r.status, entryTerm: r.entry_term }),
      lookedUpAt: new Date(r.looked_up_at).toISOString(),
    }));
  }

  /** The student behind a ref; 404 for a ref never handed out or a student no longer on record. */
  async find(ref: string): Promise<KnownStudent> {
    if (!REF_PATTERN.test(ref)) throw new NotFoundException('No student has this ref.');
    const rows: {
      pseudonym: string;
      program: string | null;
      entry_term: string | null;
      status: StudentStatus;
    }[] = await this.dataSource.query(
      `SELECT r.pseudonym, s.program, s.entry_term, s.status
       FROM student_refs r JOIN students s ON s.pseudonym = r.pseudonym
       WHERE r.ref = $1`,
      [ref],
    );
    if (!rows[0]) throw new NotFoundException('No student has this ref.');
    return {
      ref,
      pseudonym: rows[0].pseudonym,
      program: rows[0].program,
      entryTerm: rows[0].entry_term,
      status: rows[0].status,
    };
  }

  /** The student and their attempts as the given model knows them (read once per model). */
  async records(ref: string, snapshot: ModelSnapshot): Promise<StudentRecords> {
    let cache = this.byModel.get(snapshot);
    if (!cache) this.byModel.set(snapshot, (cache = new Map()));
    const hit = cache.get(ref);
    if (hit) return hit;
    const student = await this.find(ref);
    const entry = { student, attempts: await this.attempts(student.pseudonym) };
    cache.set(ref, entry);
    if (cache.size > CACHED_STUDENTS) cache.delete(cache.keys().next().value as string);
    return entry;
  }

  async attempts(pseudonym: string): Promise<Attempt[]> {
    const rows: {
      term: string;
      course_code: string;
      grade: string;
      grade_points: string | null;
      satisfaction: number | null;
      credits_attempted: string | null;
    }[] = await this.dataSource.query(
      `SELECT term, course_code, grade, grade_points, satisfaction, credits_attempted
       FROM records WHERE student_pseudonym = $1
       ORDER BY term_ordinal(term), course_code`,
      [pseudonym],
    );
    return rows.map((r) => ({
      term: r.term,
      courseCode: r.course_code,
      grade: r.grade,
      gradePoints: r.grade_points === null ? null : Number(r.grade_points),
      satisfaction: r.satisfaction === null ? null : Number(r.satisfaction),
      creditsAttempted: r.credits_attempted === null ? null : Number(r.credits_attempted),
    }));
  }

  async header(ref: string): Promise<StudentHeader> {
    const student = await this.find(ref);
    const [attempts, snapshot] = await Promise.all([
      this.attempts(student.pseudonym),
      this.model.current(),
    ]);
    const result = standing(
      attempts,
      passRule(snapshot.scale),
      (code) => snapshot.courses.get(code)?.credits ?? null,
    );
    return { ...publicView(student), ...result, attempts: attempts.length };
  }

  async history(ref: string): Promise<HistoryEntry[]> {
    const student = await this.find(ref);
    const [attempts, snapshot] = await Promise.all([
      this.attempts(student.pseudonym),
      this.model.current(),
    ]);
    return attempts.map((a) => ({
      term: a.term,
      courseCode: a.courseCode,
      title: snapshot.courses.get(a.courseCode)?.title ?? a.courseCode,
      grade: a.grade,
      gradePoints: a.gradePoints,
      satisfaction: a.satisfaction,
      creditsAttempted: a.creditsAttempted,
    }));
  }
}

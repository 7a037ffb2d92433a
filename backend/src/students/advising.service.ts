import type { AdvisingNote, SentSummary, Shortlist } from '@kinpath/contracts';
import { normalizeCourseCode } from '@kinpath/contracts';
import {
  BadRequestException,
  ForbiddenException,
  Injectable,
  NotFoundException,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource, EntityManager } from 'typeorm';
import { AuditService } from '../audit/audit.service';
import { ModelService } from '../model/model.service';
import type { User } from '../users/entities/user.entity';
import { StudentNumberCheck } from './student-number-check';
import { StudentsService } from './students.service';
import { auditAction, STUDENT_AUDIT } from './students-audit';

type Actor = Pick<User, 'id' | 'email'>;

export const NOTE_HOLDS_NUMBER =
  'The note contains a student number; remove it, as notes must not hold one (the note is filed under this student already).';
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Advising notes and the shortlist: kept per student ref, shared by every advisor. */
@Injectable()
export class AdvisingService {
  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly students: StudentsService,
    private readonly model: ModelService,
    private readonly audit: AuditService,
    private readonly numbers: StudentNumberCheck,
  ) {}

  async notes(ref: string): Promise<AdvisingNote[]> {
    await this.students.find(ref);
    const rows: {
      id: string;
      text: string;
      created_at: Date;
      edited_at: Date | null;
      display_name: string;
      email: string;
    }[] = await this.dataSource.query(
      `SELECT n.id, n.text, n.created_at, n.edited_at, u.display_name, u.email
       FROM advising_notes n JOIN users u ON u.id = n.author_id
       WHERE n.student_ref = $1 ORDER BY n.created_at DESC, n.id`,
      [ref],
    );
    return rows.map((r) => ({
      id: r.id,
      text: r.text,
      createdAt: new Date(r.created_at).toISOString(),
      editedAt: r.edited_at ? new Date(r.edited_at).toISOString() : null,
      authorName: r.display_name,
      authorEmail: r.email,
    }));
  }

  async addNote(ref: string, text: string, actor: Actor): Promise<AdvisingNote> {
    await this.students.find(ref);
    if (await this.numbers.mentionsStudent(text)) throw new BadRequestException(NOTE_HOLDS_NUMBER);
    const id = await this.dataSource.transaction(async (manager) => {
      const rows: { id: string }[] = await manager.query(
        `INSERT INTO advising_notes (student_ref, author_id, text) VALUES ($1, $2, $3) RETURNING id`,
        [ref, actor.id, text],
      );
      // The note's text may be sensitive; the trail keeps only that one was written.
      await this.audit.record(
        {
          actor,
          action: auditAction(STUDENT_AUDIT.noteAdded),
          target: ref,
          detail: { noteId: rows[0].id, length: text.length },
        },
        manager,
      );
      return rows[0].id;
    });
    return (await this.notes(ref)).find((n) => n.id === id) as AdvisingNote;
  }

  /** Only a note's author may change it; the trail records that it changed, not the words. */
  async editNote(ref: string, id: string, text: string, actor: Actor): Promise<AdvisingNote> {
    if (await this.numbers.mentionsStudent(text)) throw new BadRequestException(NOTE_HOLDS_NUMBER);
    await this.dataSource.transaction(async (manager) => {
      await this.ownNote(manager, ref, id, actor);
      await manager.query(`UPDATE advising_notes SET text = $2, edited_at = now() WHERE id = $1`, [
        id,
        text,
      ]);
      await this.audit.record(
        {
          actor,
          action: auditAction(STUDENT_AUDIT.noteEdited),
          target: ref,
          detail: { noteId: id, length: text.length },
        },
        manager,
      );
    });
    return (await this.notes(ref)).find((n) => n.id === id) as AdvisingNote;
  }

  async deleteNote(ref: string, id: string, actor: Actor): Promise<void> {
    await this.dataSource.transaction(async (manager) => {
      await this.ownNote(manager, ref, id, actor);
      await manager.query(`DELETE FROM advising_notes WHERE id = $1`, [id]);
      await this.audit.record(
        {
          actor,
          action: auditAction(STUDENT_AUDIT.noteDeleted),
          target: ref,
          detail: { noteId: id },
        },
        manager,
      );
    });
  }

  /** The note, locked, when it is this student's and the actor wrote it. */
  private async ownNote(manager: EntityManager, ref: string, id: string, actor: Actor) {
    await this.students.find(ref);
    const rows: { author_id: string }[] = UUID.test(id)
      ? await manager.query(
          `SELECT author_id FROM advising_notes WHERE id = $1 AND student_ref = $2 FOR UPDATE`,
          [id, ref],
        )
      : [];
    if (!rows[0]) throw new NotFoundException('This note does not exist or was deleted.');
    if (rows[0].author_id !== actor.id) {
      throw new ForbiddenException('Only the advisor who wrote a note may change or delete it.');
    }
  }

  /** Summaries e-mailed to the student, newest first. */
  async sentSummaries(ref: string): Promise<SentSummary[]> {
    await this.students.find(ref);
    const rows: {
      id: string;
      sent_at: Date;
      to_address: string;
      term: string;
      course_codes: string[];
      display_name: string;
    }[] = await this.dataSource.query(
      `SELECT s.id, s.sent_at, s.to_address, s.term, s.course_codes, u.display_name
       FROM sent_summaries s JOIN users u ON u.id = s.sender_id
       WHERE s.student_ref = $1 ORDER BY s.sent_at DESC, s.id`,
      [ref],
    );
    return rows.map((r) => ({
      id: r.id,
      sentAt: new Date(r.sent_at).toISOString(),
      to: r.to_address,
      term: r.term,
      courseCodes: r.course_codes,
      senderName: r.display_name,
    }));
  }

  async shortlist(ref: string): Promise<Shortlist> {
    await this.students.find(ref);
    return this.readShortlist(ref);
  }

  /**
   * Replaces the shortlist with these courses. Courses already on it keep who
   * added them and when; only an actual change is written and audited.
   */
  async replaceShortlist(ref: string, given: string[], actor: Actor): Promise<Shortlist> {
    await this.students.find(ref);
    const snapshot = await this.model.current();
    const codes: string[] = [];
    for (const value of given) {
      const code = normalizeCourseCode(value);
      if (!code || !snapshot.courses.has(code)) {
        throw new BadRequestException(`'${value}' is not a course of the catalogue.`);
      }
      if (!codes.includes(code)) codes.push(code);
    }
    await this.dataSource.transaction(async (manager: EntityManager) => {
      // Two advisors saving at once: one after the other, each seeing the other's result.
      await manager.query(`SELECT pg_advisory_xact_lock(hashtext('kinpath:shortlist:' || $1))`, [
        ref,
      ]);
      const current: { course_code: string }[] = await manager.query(
        `SELECT course_code FROM shortlist_items WHERE student_ref = $1`,
        [ref],
      );
      const before = new Set(current.map((r) => r.course_code));
      const added = codes.filter((c) => !before.has(c));
      const removed = [...before].filter((c) => !codes.includes(c)).sort();
      if (added.length === 0 && removed.length === 0) return;
      await manager.query(
        `DELETE FROM shortlist_items WHERE student_ref = $1 AND course_code = ANY($2::text[])`,
        [ref, removed],
      );
      await manager.query(
        `INSERT INTO shortlist_items (student_ref, course_code, added_by)
         SELECT $1, unnest($2::text[]), $3`,
        [ref, added, actor.id],
      );
      await manager.query(
        `INSERT INTO shortlist_changes (student_ref, changed_by) VALUES ($1, $2)
         ON CONFLICT (student_ref) DO UPDATE SET changed_by = EXCLUDED.changed_by, changed_at = now()`,
        [ref, actor.id],
      );
      await this.audit.record(
        {
          actor,
          action: auditAction(STUDENT_AUDIT.shortlistChanged),
          target: ref,
          detail: { added, removed },
        },
        manager,
      );
    });
    return this.readShortlist(ref);
  }

  private async readShortlist(ref: string): Promise<Shortlist> {
    const snapshot = await this.model.current();
    const items: { course_code: string; added_at: Date; display_name: string; email: string }[] =
      await this.dataSource.query(
        `SELECT i.course_code, i.added_at, u.display_name, u.email
         FROM shortlist_items i JOIN users u ON u.id = i.added_by
         WHERE i.student_ref = $1 ORDER BY i.added_at, i.course_code`,
        [ref],
      );
    const change: { changed_at: Date; display_name: string; email: string }[] =
      await this.dataSource.query(
        `SELECT c.changed_at, u.display_name, u.email
         FROM shortlist_changes c JOIN users u ON u.id = c.changed_by WHERE c.student_ref = $1`,
        [ref],
      );
    return {
      courseCodes: items.map((i) => i.course_code),
      items: items.map((i) => ({
        courseCode: i.course_code,
        title: snapshot.courses.get(i.course_code)?.title ?? i.course_code,
        addedAt: new Date(i.added_at).toISOString(),
        addedByName: i.display_name,
        addedByEmail: i.email,
      })),
      updatedAt: change[0] ? new Date(change[0].changed_at).toISOString() : null,
      updatedByName: change[0]?.display_name ?? null,
      updatedByEmail: change[0]?.email ?? null,
    };
  }
}

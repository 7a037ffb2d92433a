import type { GradeScale, UpdateGradeScaleResponse } from '@kinpath/contracts';
import { BadRequestException, ConflictException, Injectable } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { ClientBase } from 'pg';
import { Subject } from 'rxjs';
import type { DataSource } from 'typeorm';
import type { AuditAction } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { rederiveGradePoints, TERM_DATA_LOCK } from '../imports/term-data-writer';
import type { User } from '../users/entities/user.entity';
import type { UpdateGradeScaleDto } from './dto/update-grade-scale.dto';
import { GradeScaleModel, loadGradeScale } from './grade-scale.model';

export const GRADE_SCALE_AUDIT = 'grade_scale.updated';

@Injectable()
export class GradeScaleService {
  private readonly changedSubject = new Subject<void>();
  /** After a saved change: the grade points of stored records may differ now. */
  readonly changed = this.changedSubject.asObservable();

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly audit: AuditService,
  ) {}

  async get(): Promise<GradeScale> {
    return (await loadGradeScale((sql) => this.dataSource.query(sql))).toApi();
  }

  /**
   * Replaces the scale and re-derives the grade points of every stored record in
   * one statement. A letter still used by records cannot be dropped: those
   * records would lose their meaning.
   */
  async update(
    dto: UpdateGradeScaleDto,
    actor: Pick<User, 'id' | 'email'>,
  ): Promise<UpdateGradeScaleResponse> {
    const letters = dto.letters.map((l) => ({
      letter: l.letter.trim().toUpperCase(),
      points: l.points,
    }));
    const marks = dto.marks.map((m) => ({
      letter: m.letter.trim().toUpperCase(),
      passing: m.passing,
    }));
    const all = [...letters.map((l) => l.letter), ...marks.map((m) => m.letter)];
    const repeated = all.filter((l, i) => all.indexOf(l) !== i);
    if (repeated.length) {
      throw new BadRequestException(`${[...new Set(repeated)].join(', ')} appears more than once.`);
    }
    // Stored best first whatever order they came in, so a new top letter is one step.
    letters.sort((a, b) => b.points - a.points);
    const threshold = letters.find((l) => l.letter === dto.passingThreshold.trim().toUpperCase());
    if (!threshold) {
      throw new BadRequestException(
        `The passing threshold '${dto.passingThreshold}' is not one of the letters (${letters.map((l) => l.letter).join(', ')}).`,
      );
    }
    const entries = [
      ...letters.map((l) => ({ ...l, passing: l.points >= threshold.points })),
      ...marks.map((m) => ({ ...m, points: null })),
    ];

    const runner = this.dataSource.createQueryRunner();
    let recordsUpdated = 0;
    try {
      const client = (await runner.connect()) as ClientBase;
      await runner.startTransaction();
      await client.query(TERM_DATA_LOCK);
      const { rows: orphans } = await client.query<{ grade: string; n: string }>(
        `SELECT grade, count(*) AS n FROM records
         WHERE grade !~ '^[0-9]' AND NOT (grade = ANY($1::text[]))
         GROUP BY grade ORDER BY grade`,
        [all],
      );
      if (orphans.length) {
        throw new ConflictException(
          `Stored records use ${orphans.map((o) => `${o.grade} (${o.n} records)`).join(', ')}; keep ${orphans.length > 1 ? 'these' : 'this'} on the scale.`,
        );
      }
      await client.query(`DELETE FROM grade_scale`);
      await client.query(
        `INSERT INTO grade_scale (letter, points, passing, sort_order)
         SELECT * FROM unnest($1::text[], $2::numeric[], $3::boolean[], $4::smallint[])`,
        [
          entries.map((e) => e.letter),
          entries.map((e) => e.points),
          entries.map((e) => e.passing),
          entries.map((_, i) => i + 1),
        ],
      );
      recordsUpdated = await rederiveGradePoints(client);
      await this.audit.record(
        {
          actor,
          action: GRADE_SCALE_AUDIT as unknown as AuditAction,
          target: 'grade_scale',
          detail: { letters, marks, passingThreshold: threshold.letter, recordsUpdated },
        },
        runner.manager,
      );
      await runner.commitTransaction();
      this.changedSubject.next();
    } catch (error) {
      if (runner.isTransactionActive) await runner.rollbackTransaction().catch(() => undefined);
      throw error;
    } finally {
      await runner.release();
    }
    return { ...new GradeScaleModel(entries).toApi(), recordsUpdated };
  }
}

import type { CourseSummary, TermsResponse } from '@kinpath/contracts';
import { nextTerm, termOrdinal } from '@kinpath/contracts';
import { Injectable } from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { FindOptionsWhere, Repository } from 'typeorm';
import { Course } from '../term-data/entities/course.entity';

@Injectable()
export class CatalogueService {
  constructor(@InjectRepository(Course) private readonly courses: Repository<Course>) {}

  async list(filter: { department?: string; elective?: boolean }): Promise<CourseSummary[]> {
    const where: FindOptionsWhere<Course> = {};
    if (filter.department) where.department = filter.department.toUpperCase();
    if (filter.elective !== undefined) where.elective = filter.elective;
    const rows = await this.courses.find({ where, order: { courseCode: 'ASC' } });
    return rows.map((c) => ({
      courseCode: c.courseCode,
      title: c.title,
      department: c.department,
      credits: c.credits,
      level: c.level,
      elective: c.elective,
      prerequisites: c.prerequisites,
      description: c.description,
    }));
  }

  /** Terms with records or offerings, in time order (not string order: FA < SP as text). */
  async terms(): Promise<TermsResponse> {
    const rows: { term: string; records: string; offerings: string }[] = await this.courses.query(
      `SELECT term, sum(records) AS records, sum(offerings) AS offerings FROM (
         SELECT term, count(*) AS records, 0 AS offerings FROM records GROUP BY term
         UNION ALL
         SELECT term, 0, count(*) FROM offerings GROUP BY term
       ) t GROUP BY term ORDER BY term_ordinal(term)`,
    );
    const terms = rows.map((r) => ({
      term: r.term,
      records: Number(r.records),
      offerings: Number(r.offerings),
    }));
    const withRecords = terms.filter((t) => t.records > 0);
    const current = withRecords.length ? withRecords[withRecords.length - 1].term : null;
    let next: string | null = null;
    if (current) {
      const after = terms.find(
        (t) => termOrdinal(t.term) > termOrdinal(current) && t.offerings > 0,
      );
      next = after ? after.term : nextTerm(current);
    }
    return { terms, current, next };
  }
}

import type {
  BacktestCourse,
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
} from '@kinpath/contracts';
import { DEFAULT_AT_RISK_BELOW, FORECAST_FLAG_LABELS } from '@kinpath/contracts';
import { wape } from '@kinpath/engine';
import { ForbiddenException, Injectable, NotFoundException } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { CatalogueService } from '../catalogue/catalogue.service';
import type { User } from '../users/entities/user.entity';
import { forecastFlag, toCsv, utilisation } from './forecast-rules';
import { ScoringRunsService, toSummary } from './scoring-runs.service';

type Viewer = Pick<User, 'role' | 'department'>;

/**
 * Department scope: a head sees their own department only and asking for another is refused
 * (403, not an empty list); registrar staff see every department and may pick one.
 */
export function scopedDepartment(viewer: Viewer, requested: string | undefined): string | null {
  const asked = requested?.toUpperCase();
  if (viewer.role === 'department_head') {
    const own = viewer.department?.toUpperCase() ?? null;
    if (!own) throw new ForbiddenException('Your account is not linked to a department.');
    if (asked && asked !== own) {
      throw new ForbiddenException(
        `You can see the demand outlook of department ${own} only, not ${asked}.`,
      );
    }
    return own;
  }
  return asked ?? null;
}

const fixed = (x: number | null, digits: number) => (x === null ? '' : x.toFixed(digits));

@Injectable()
export class ForecastsService {
  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly catalogue: CatalogueService,
    private readonly runs: ScoringRunsService,
  ) {}

  private async termOr(term: string | undefined): Promise<string | null> {
    return term ?? (await this.catalogue.terms()).next;
  }

  async about(termParam: string | undefined, viewer: Viewer): Promise<ForecastAbout> {
    scopedDepartment(viewer, undefined);
    const term = await this.termOr(termParam);
    if (!term) {
      return {
        term: null,
        offerings: 0,
        run: null,
        pending: null,
        betaMethod: null,
        defaultAtRiskBelow: DEFAULT_AT_RISK_BELOW,
      };
    }
    const [{ n }] = (await this.dataSource.query(
      `SELECT count(*) AS n FROM offerings o JOIN courses c USING (course_code)
       WHERE o.term = $1 AND c.elective`,
      [term],
    )) as { n: string }[];
    const [run, pending] = await Promise.all([this.runs.latestDone(term), this.runs.pending(term)]);
    return {
      term,
      offerings: Number(n),
      run: run ? toSummary(run) : null,
      pending: pending ? toSummary(pending) : null,
      betaMethod: run?.beta_method ?? null,
      defaultAtRiskBelow: DEFAULT_AT_RISK_BELOW,
    };
  }

  async forecast(
    query: { term?: string; department?: string; atRiskBelow?: number },
    viewer: Viewer,
  ): Promise<CourseForecast[]> {
    const department = scopedDepartment(viewer, query.department);
    const term = await this.termOr(query.term);
    if (!term) return [];
    const run = await this.runs.latestDone(term);
    if (!run) return [];
    const threshold = query.atRiskBelow ?? DEFAULT_AT_RISK_BELOW;
    const rows: {
      course_code: string;
      title: string;
      department: string;
      capacity: number;
      sections: number | null;
      expected: number;
      low: number;
      high: number;
    }[] = await this.dataSource.query(
      `SELECT f.course_code, c.title, c.department, o.capacity, o.sections, f.expected, f.low, f.high
       FROM forecast_courses f
       JOIN courses c ON c.course_code = f.course_code
       JOIN offerings o ON o.course_code = f.course_code AND o.term = $2
       WHERE f.run_id = $1 AND f.part = 'forecast' AND ($3::text IS NULL OR c.department = $3)
       ORDER BY c.department, f.course_code`,
      [run.id, term, department],
    );
    return rows.map((r) => ({
      courseCode: r.course_code,
      title: r.title,
      department: r.department,
      capacity: Number(r.capacity),
      sections: r.sections === null ? null : Number(r.sections),
      expected: r.expected,
      low: r.low,
      high: r.high,
      utilisation: utilisation(r.expected, Number(r.capacity)),
      flag: forecastFlag(r.expected, r.low, Number(r.capacity), threshold),
    }));
  }

  async forecastCsv(
    query: { term?: string; department?: string; atRiskBelow?: number },
    viewer: Viewer,
  ): Promise<{ term: string | null; csv: string }> {
    const term = await this.termOr(query.term);
    const rows = await this.forecast({ ...query, term: term ?? undefined }, viewer);
    const csv = toCsv(
      [
        'term',
        'course_code',
        'title',
        'department',
        'sections',
        'seats',
        'expected',
        'interval_low_80',
        'interval_high_80',
        'utilisation',
        'flag',
      ],
      rows.map((r) => [
        term ?? '',
        r.courseCode,
        r.title,
        r.department,
        r.sections === null ? '' : String(r.sections),
        String(r.capacity),
        fixed(r.expected, 1),
        fixed(r.low, 1),
        fixed(r.high, 1),
        fixed(r.utilisation, 3),
        FORECAST_FLAG_LABELS[r.flag],
      ]),
    );
    return { term, csv };
  }

  async backtest(
    query: { term?: string; department?: string },
    viewer: Viewer,
  ): Promise<BacktestResponse> {
    const department = scopedDepartment(viewer, query.department);
    let run;
    if (query.term) {
      run = await this.runs.latestBacktest(query.term);
      if (!run) {
        throw new NotFoundException(
          `No backtest of ${query.term} has been computed; the backtest covers the last completed term before a forecast term.`,
        );
      }
    } else {
      const term = await this.termOr(undefined);
      run = term ? await this.runs.latestDone(term) : null;
    }
    if (!run?.backtest_term) {
      return {
        term: null,
        modelWape: null,
        naiveWape: null,
        beta: null,
        betaMethod: null,
        courses: [],
      };
    }
    const rows: {
      course_code: string;
      title: string;
      department: string;
      expected: number;
      low: number;
      high: number;
      actual: number;
      naive: number;
      naive_term: string | null;
    }[] = await this.dataSource.query(
      `SELECT f.course_code, c.title, c.department, f.expected, f.low, f.high, f.actual, f.naive,
         f.naive_term
       FROM forecast_courses f JOIN courses c ON c.course_code = f.course_code
       WHERE f.run_id = $1 AND f.part = 'backtest' AND ($2::text IS NULL OR c.department = $2)
       ORDER BY c.department, f.course_code`,
      [run.id, department],
    );
    const err = (f: number, a: number) => (a > 0 ? Math.abs(f - a) / a : null);
    const courses: BacktestCourse[] = rows.map((r) => ({
      courseCode: r.course_code,
      title: r.title,
      department: r.department,
      forecast: r.expected,
      low: r.low,
      high: r.high,
      actual: r.actual,
      naive: r.naive,
      naiveTerm: r.naive_term,
      modelError: err(r.expected, r.actual),
      naiveError: err(r.naive, r.actual),
    }));
    return {
      term: run.backtest_term,
      modelWape: wape(
        courses.map((c) => c.forecast),
        courses.map((c) => c.actual),
      ),
      naiveWape: wape(
        courses.map((c) => c.naive),
        courses.map((c) => c.actual),
      ),
      beta: run.beta_backtest,
      betaMethod: run.beta_backtest_method,
      courses,
    };
  }
}

import type {
  BacktestCourse,
  BacktestResponse,
  BacktestTerm,
  CourseForecast,
  ForecastAbout,
} from '@kinpath/contracts';
import { DEFAULT_AT_RISK_BELOW, FORECAST_FLAG_LABELS } from '@kinpath/contracts';
import { outlook } from '@kinpath/engine';
import { ForbiddenException, Injectable, NotFoundException } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { CatalogueService } from '../catalogue/catalogue.service';
import type { User } from '../users/entities/user.entity';
import { forecastFlag, toCsv, utilisation } from './forecast-rules';
import { OutlookRunsService, toSummary } from './outlook-runs.service';

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

const SIMPLE = [
  ['naiveWape', 'the naive forecast (enrolment the last time each elective ran)'],
  ['sameTermWape', 'the same term a year before'],
  ['takeUpWape', 'the take-up rate times the students open to each elective'],
] as const;

/**
 * One sentence when the model's mean WAPE over the backtest terms is not below the best
 * simple forecast's; null when it beats all three.
 */
export function verdict(terms: readonly BacktestTerm[]): string | null {
  const mean = (pick: (t: BacktestTerm) => number | null) => {
    const xs = terms.map(pick).filter((x): x is number => x !== null);
    return xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null;
  };
  const model = mean((t) => t.modelWape);
  if (model === null) return null;
  let best: { name: string; wape: number } | null = null;
  for (const [key, name] of SIMPLE) {
    const w = mean((t) => t[key]);
    if (w !== null && (!best || w < best.wape)) best = { name, wape: w };
  }
  if (!best || model < best.wape) return null;
  return `Over the last ${terms.length} completed terms the model did not beat ${best.name}: its mean WAPE was ${(100 * model).toFixed(1)} % against ${(100 * best.wape).toFixed(1)} %, so weigh its figures accordingly.`;
}

interface CourseRow {
  course_code: string;
  title: string;
  department: string;
  expected: number;
  variance: number;
  low: number;
  high: number;
  no_history: boolean;
  actual: number | null;
  naive: number;
  naive_term: string | null;
  same_term: number;
  take_up: number;
}

@Injectable()
export class ForecastsService {
  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly catalogue: CatalogueService,
    private readonly runs: OutlookRunsService,
  ) {}

  private async termOr(term: string | undefined): Promise<string | null> {
    return term ?? (await this.catalogue.terms()).next;
  }

  async about(termParam: string | undefined, viewer: Viewer): Promise<ForecastAbout> {
    const department = scopedDepartment(viewer, undefined);
    const term = await this.termOr(termParam);
    if (!term) {
      return {
        term: null,
        offerings: 0,
        run: null,
        pending: null,
        drivers: null,
        defaultAtRiskBelow: DEFAULT_AT_RISK_BELOW,
      };
    }
    // A head counts their own department's offerings, as their table shows.
    const [{ n }] = (await this.dataSource.query(
      `SELECT count(*) AS n FROM offerings o JOIN courses c USING (course_code)
       WHERE o.term = $1 AND c.elective AND ($2::text IS NULL OR c.department = $2)`,
      [term, department],
    )) as { n: string }[];
    const [run, pending] = await Promise.all([this.runs.latestDone(term), this.runs.pending(term)]);
    return {
      term,
      offerings: Number(n),
      run: run ? toSummary(run) : null,
      pending: pending ? toSummary(pending) : null,
      drivers: run?.summary?.drivers || null,
      defaultAtRiskBelow: DEFAULT_AT_RISK_BELOW,
    };
  }

  private async courses(
    runId: string,
    term: string,
    department: string | null,
  ): Promise<CourseRow[]> {
    return this.dataSource.query(
      `SELECT f.course_code, c.title, c.department, f.expected, f.variance, f.low, f.high,
         f.no_history, f.actual, f.naive, f.naive_term, f.same_term, f.take_up
       FROM outlook_courses f JOIN courses c ON c.course_code = f.course_code
       WHERE f.run_id = $1 AND f.term = $2 AND ($3::text IS NULL OR c.department = $3)
       ORDER BY c.department, f.course_code`,
      [runId, term, department],
    );
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
    const rows = await this.courses(run.id, term, department);
    const seats: { course_code: string; capacity: number; sections: number | null }[] =
      await this.dataSource.query(
        `SELECT course_code, capacity, sections FROM offerings WHERE term = $1`,
        [term],
      );
    const offering = new Map(seats.map((o) => [o.course_code, o]));
    return rows.map((r) => {
      const capacity = Number(offering.get(r.course_code)?.capacity ?? 0);
      const sections = offering.get(r.course_code)?.sections ?? null;
      return {
        courseCode: r.course_code,
        title: r.title,
        department: r.department,
        capacity,
        sections: sections === null ? null : Number(sections),
        expected: r.expected,
        low: r.low,
        high: r.high,
        utilisation: utilisation(r.expected, capacity),
        flag: forecastFlag(r.expected, r.low, capacity, threshold, r.no_history),
        noHistory: r.no_history,
        classProfile: null,
      };
    });
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
        'utilisation_percent',
        'flag',
        'no_history',
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
        fixed(r.utilisation === null ? null : 100 * r.utilisation, 1),
        FORECAST_FLAG_LABELS[r.flag],
        r.noHistory ? 'yes' : 'no',
      ]),
    );
    return { term, csv };
  }

  async backtest(
    query: { term?: string; department?: string },
    viewer: Viewer,
  ): Promise<BacktestResponse> {
    const department = scopedDepartment(viewer, query.department);
    const next = await this.termOr(undefined);
    const run = next ? await this.runs.latestDone(next) : null;
    const terms: BacktestTerm[] = (run?.summary?.terms ?? []).map((t) => ({
      term: t.term,
      modelWape: t.modelWape,
      naiveWape: t.naiveWape,
      sameTermWape: t.sameTermWape,
      takeUpWape: t.takeUpWape,
      coverage: t.coverage,
    }));
    const empty: BacktestResponse = {
      terms,
      term: null,
      modelWape: null,
      naiveWape: null,
      sameTermWape: null,
      takeUpWape: null,
      coverage: null,
      verdict: verdict(terms),
      courses: [],
    };
    if (!run) return empty;
    const chosen = query.term ?? terms[terms.length - 1]?.term;
    if (!chosen) return empty;
    if (!terms.some((t) => t.term === chosen)) {
      throw new NotFoundException(
        `No backtest of ${chosen}: the backtest covers the last three completed terms (${terms.map((t) => t.term).join(', ') || 'none yet'}).`,
      );
    }
    const rows = await this.courses(run.id, chosen, department);
    const err = (f: number, a: number) => (a > 0 ? Math.abs(f - a) / a : null);
    const courses: BacktestCourse[] = rows.map((r) => {
      const actual = Number(r.actual ?? 0);
      return {
        courseCode: r.course_code,
        title: r.title,
        department: r.department,
        forecast: r.expected,
        low: r.low,
        high: r.high,
        actual,
        naive: r.naive,
        naiveTerm: r.naive_term,
        sameTerm: r.same_term,
        takeUp: r.take_up,
        noHistory: r.no_history,
        modelError: err(r.expected, actual),
        naiveError: err(r.naive, actual),
        inside: actual >= r.low && actual <= r.high,
      };
    });
    const actual = courses.map((c) => c.actual);
    const w = (pick: (c: BacktestCourse) => number) => outlook.wape(courses.map(pick), actual);
    return {
      terms,
      term: chosen,
      modelWape: w((c) => c.forecast),
      naiveWape: w((c) => c.naive),
      sameTermWape: w((c) => c.sameTerm),
      takeUpWape: w((c) => c.takeUp),
      coverage: outlook.coverage(
        courses.map((c) => c.low),
        courses.map((c) => c.high),
        actual,
      ),
      verdict: verdict(terms),
      courses,
    };
  }
}

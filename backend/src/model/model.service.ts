import type { TermsResponse } from '@kinpath/contracts';
import {
  buildTable,
  calibrateRanges,
  modelFromTable,
  similarities,
  type Model,
  type RangeTable,
  type Scale,
  type Signal,
} from '@kinpath/engine';
import type { ModelSettingsVersion } from '@kinpath/contracts';
import {
  Injectable,
  Logger,
  OnApplicationBootstrap,
  OnModuleDestroy,
  ServiceUnavailableException,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { ClientBase } from 'pg';
import { to as copyTo } from 'pg-copy-streams';
import type { Subscription } from 'rxjs';
import type { DataSource } from 'typeorm';
import { GradeScaleService } from '../grade-scale/grade-scale.service';
import { CatalogueService } from '../catalogue/catalogue.service';
import { GradeScaleModel, loadGradeScale } from '../grade-scale/grade-scale.model';
import { ImportsService } from '../imports/imports.service';
import { TermDataEvents } from '../imports/term-data-events';
import { parsePrerequisites } from '../imports/validation/prerequisites';
import { engineSettings } from './engine-settings';
import { ModelEvents } from './model-events';
import type { CatalogueEntry, ModelSnapshot } from './model-snapshot';
import { ModelSettingsService } from './model-settings.service';
import { termSortKey } from './term-keys';

const SATISFACTION_SCALE: Scale = { min: 1, max: 5 };
/** Held-out students behind the likely ranges (every m-th of the term's), bounding the cost. */
const RANGE_STUDENTS = 2000;

/** Records arrive as parallel arrays; repeated keys share one string. */
export interface RecordColumns {
  students: string[];
  courses: string[];
  terms: string[];
  grades: number[];
  satisfaction: number[];
  /** Grade points outside the scale's range, left out of the model (see below). */
  outOfScale: number;
}

/**
 * The advising model in memory. Built at start and again after every term-data
 * change, in the background: the previous model answers until the new one is
 * ready, at most one build runs at a time, and changes arriving during a build
 * cause exactly one more build after it.
 */
@Injectable()
export class ModelService implements OnApplicationBootstrap, OnModuleDestroy {
  private readonly logger = new Logger(ModelService.name);
  private snapshot: ModelSnapshot | null = null;
  private running: Promise<void> | null = null;
  private again = false;
  /** Imports announced by the term-data event and not yet in a finished build. */
  private announced = new Set<string>();
  private subscriptions: Subscription[] = [];

  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly catalogue: CatalogueService,
    private readonly imports: ImportsService,
    private readonly termData: TermDataEvents,
    private readonly settings: ModelSettingsService,
    private readonly events: ModelEvents,
    private readonly gradeScale: GradeScaleService,
  ) {}

  onApplicationBootstrap(): void {
    this.subscriptions.push(
      this.termData.changed.subscribe((event) => {
        this.announced.add(event.importId);
        void this.rebuild();
      }),
      // Re-derived grade points change every grade value the model holds.
      this.gradeScale.changed.subscribe(() => void this.rebuild()),
      this.events.settingsChanged$.subscribe(() => {
        if (!this.snapshot) return;
        this.warm(this.snapshot).catch((error: Error) =>
          this.logger.warn(`Could not prepare the model for the new settings: ${error.message}`),
        );
      }),
    );
    // In the background: the server answers health checks while the model builds,
    // and the first advising request waits for it (see `current`).
    void this.rebuild();
  }

  onModuleDestroy(): void {
    for (const s of this.subscriptions) s.unsubscribe();
  }

  /** The model in force; waits for the first build when none has finished yet. */
  async current(): Promise<ModelSnapshot> {
    if (this.snapshot) return this.snapshot;
    await (this.running ?? this.rebuild());
    if (!this.snapshot) {
      throw new ServiceUnavailableException(
        'The advising model could not be built from the term data yet; try again in a moment.',
      );
    }
    return this.snapshot;
  }

  /** When the model in force was built; null before the first build. */
  get builtAt(): Date | null {
    return this.snapshot?.builtAt ?? null;
  }

  /**
   * Asks for a build. Resolves when the model includes every change announced
   * before the call (a build already running is followed by one more).
   */
  rebuild(): Promise<void> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = this.loop();
    return this.running;
  }

  private async loop(): Promise<void> {
    for (;;) {
      this.again = false;
      const announced = [...this.announced];
      this.announced.clear();
      try {
        await this.buildOnce(announced);
      } catch (error) {
        // Keep answering with the previous model; the next change tries again.
        for (const id of announced) this.announced.add(id);
        this.logger.error(`The model could not be rebuilt: ${(error as Error).message}`);
      }
      if (!this.again) {
        // Cleared in the same tick as the check, so no request can slip between them.
        this.running = null;
        return;
      }
    }
  }

  private async buildOnce(announced: string[]): Promise<void> {
    const started = Date.now();
    const data = await this.readTermData(async (client) => ({
      offerings: await this.readOfferings(client),
      pendingImports: await this.importsAwaitingModel(client),
    }));
    const { records: columns, scale, scales, courses } = data;
    const { offerings, pendingImports } = data.alongside;
    const terms: TermsResponse = await this.catalogue.terms();
    const table = buildTable(columns, { scales });
    const model: Model = modelFromTable(table);
    const electives = [...courses.values()]
      .filter((c) => c.elective)
      .sort((a, b) => (a.courseCode < b.courseCode ? -1 : a.courseCode > b.courseCode ? 1 : 0));
    const snapshot: ModelSnapshot = {
      model,
      table,
      ranges: new Map(),
      builtAt: new Date(),
      scale,
      courses,
      electives,
      offerings,
      terms,
      students: model.studentKeys.length,
      records: columns.students.length,
    };
    await this.warm(snapshot);
    this.snapshot = snapshot;
    const buildMs = Date.now() - started;
    if (data.outOfScale > 0) {
      this.logger.warn(
        `${data.outOfScale} records carry grade points outside the grade scale (${scale.minPoints} to ${scale.maxPoints}) and were left out of the model.`,
      );
    }
    this.logger.log(
      `Model built in ${buildMs} ms: ${snapshot.students} students, ${snapshot.records} records, ${courses.size} courses.`,
    );
    const importIds = [...new Set([...announced, ...pendingImports])];
    for (const id of importIds) {
      await this.imports
        .markModelRefreshed(id, snapshot.builtAt)
        .catch((error: Error) =>
          this.logger.warn(`Could not note the model refresh on import ${id}: ${error.message}`),
        );
    }
    this.events.publishRefreshed({
      builtAt: snapshot.builtAt,
      importIds,
      students: snapshot.students,
      records: snapshot.records,
      buildMs,
    });
  }

  /**
   * The term data exactly as the model reads it (engine term keys, grade points
   * within the scale, the same scales) in one consistent view, without building
   * or replacing the model in force: for backtests. `alongside` reads more in that view.
   */
  async readTermData<T>(alongside: (client: ClientBase) => Promise<T>): Promise<{
    records: Omit<RecordColumns, 'outOfScale'>;
    scale: GradeScaleModel;
    scales: { grade?: Scale; satisfaction: Scale };
    courses: Map<string, CatalogueEntry>;
    outOfScale: number;
    alongside: T;
  }> {
    const runner = this.dataSource.createQueryRunner();
    try {
      const client = (await runner.connect()) as ClientBase;
      await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
      try {
        const scale = await loadGradeScale(async (sql) => (await client.query(sql)).rows);
        const { outOfScale, ...records } = await this.readRecords(client, scale);
        const courses = await this.readCourses(client);
        const extra = await alongside(client);
        const scales: { grade?: Scale; satisfaction: Scale } = { satisfaction: SATISFACTION_SCALE };
        if (scale.maxPoints > scale.minPoints)
          scales.grade = { min: scale.minPoints, max: scale.maxPoints };
        return { records, scale, scales, courses, outOfScale, alongside: extra };
      } finally {
        await client.query('COMMIT');
      }
    } finally {
      await runner.release();
    }
  }

  /**
   * Streams the records out with COPY (a few hundred bytes each, millions of
   * them at a large institution) into the engine's parallel arrays.
   */
  private async readRecords(client: ClientBase, scale: GradeScaleModel): Promise<RecordColumns> {
    const out: RecordColumns = {
      students: [],
      courses: [],
      terms: [],
      grades: [],
      satisfaction: [],
      outOfScale: 0,
    };
    const courseKeys = new Map<string, string>();
    const termKeys = new Map<string, string>();
    let lastStudent = '';
    const stream = client.query(
      copyTo(
        `COPY (SELECT student_pseudonym, course_code, term, grade_points, satisfaction
               FROM records ORDER BY student_pseudonym) TO STDOUT`,
      ),
    );
    let rest = '';
    const take = (line: string) => {
      if (line === '') return;
      const [student, course, term, points, satisfaction] = line.split('\t');
      // Ordered by student, so one string per student is kept instead of one per record.
      if (student !== lastStudent) lastStudent = student;
      let courseKey = courseKeys.get(course);
      if (courseKey === undefined) courseKeys.set(course, (courseKey = course));
      let termKey = termKeys.get(term);
      if (termKey === undefined) termKeys.set(term, (termKey = termSortKey(term)));
      let grade = points === '\\N' ? NaN : Number(points);
      // A scale edited since these points were derived; the engine refuses them, so they wait.
      if (grade === grade && (grade < scale.minPoints || grade > scale.maxPoints)) {
        out.outOfScale++;
        grade = NaN;
      }
      out.students.push(lastStudent);
      out.courses.push(courseKey);
      out.terms.push(termKey);
      out.grades.push(grade);
      out.satisfaction.push(satisfaction === '\\N' ? NaN : Number(satisfaction));
    };
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      const text = rest + chunk.toString('utf8');
      const lines = text.split('\n');
      rest = lines.pop() ?? '';
      for (const line of lines) take(line);
    }
    take(rest);
    return out;
  }

  private async readCourses(client: ClientBase): Promise<Map<string, CatalogueEntry>> {
    const { rows } = await client.query<{
      course_code: string;
      title: string;
      department: string;
      credits: string | null;
      elective: boolean;
      prerequisites: string;
    }>(`SELECT course_code, title, department, credits, elective, prerequisites FROM courses`);
    const courses = new Map<string, CatalogueEntry>();
    for (const row of rows) {
      const parsed = parsePrerequisites(row.prerequisites ?? '');
      if (!parsed.ok) {
        this.logger.warn(
          `The prerequisites of ${row.course_code} cannot be read (${parsed.error}); they are ignored.`,
        );
      }
      courses.set(row.course_code, {
        courseCode: row.course_code,
        title: row.title,
        department: row.department,
        credits: row.credits === null ? null : Number(row.credits),
        elective: row.elective,
        prerequisites: parsed.ok ? parsed.expression : null,
      });
    }
    return courses;
  }

  private async readOfferings(client: ClientBase): Promise<Map<string, Set<string>>> {
    const { rows } = await client.query<{ term: string; course_code: string }>(
      `SELECT term, course_code FROM offerings`,
    );
    const offerings = new Map<string, Set<string>>();
    for (const row of rows) {
      let set = offerings.get(row.term);
      if (!set) offerings.set(row.term, (set = new Set()));
      set.add(row.course_code);
    }
    return offerings;
  }

  /**
   * Committed or rolled-back imports the history does not yet show as in the
   * model: after a restart, and the demo loaded at first start, which announces nothing.
   */
  private async importsAwaitingModel(client: ClientBase): Promise<string[]> {
    try {
      await client.query('SAVEPOINT awaiting_model');
      const { rows } = await client.query<{ id: string }>(
        `SELECT id FROM imports
         WHERE model_refreshed_at IS NULL AND status IN ('committed', 'rolled_back')`,
      );
      return rows.map((r) => r.id);
    } catch {
      await client.query('ROLLBACK TO SAVEPOINT awaiting_model');
      return [];
    }
  }

  /**
   * Computes the similarity arrays of the settings in force before the model
   * serves, so the first advisor does not pay for them.
   */
  private async warm(snapshot: ModelSnapshot): Promise<void> {
    const first = snapshot.model.studentKeys[0];
    if (first === undefined) return;
    const current = await this.settings.current();
    similarities(snapshot.model, first, engineSettings(current.settings), 1);
    this.ranges(snapshot, current);
  }

  /**
   * Likely-range tables for a settings version: the residuals of a backtest on the last
   * completed term (trained on the terms before it), at most RANGE_STUDENTS held-out
   * students. Empty when there is no such term with earlier terms to learn from.
   */
  ranges(
    snapshot: ModelSnapshot,
    version: ModelSettingsVersion,
  ): Partial<Record<Signal, RangeTable>> {
    let tables = snapshot.ranges.get(version.version);
    if (!tables) {
      tables = {};
      const term = snapshot.terms.current;
      const key = term ? termSortKey(term) : null;
      const at = key ? snapshot.table.termKeys.indexOf(key) : -1;
      if (key && at >= 1) {
        const started = Date.now();
        tables = calibrateRanges(snapshot.table, key, engineSettings(version.settings), {
          maxStudents: RANGE_STUDENTS,
        });
        this.logger.log(
          `Likely ranges for settings version ${version.version} from ${term} in ${Date.now() - started} ms.`,
        );
      }
      snapshot.ranges.set(version.version, tables);
    }
    return tables;
  }
}

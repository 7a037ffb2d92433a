import type { TermsResponse } from '@kinpath/contracts';
import type { Model, RangeTable, RecordTable, Signal } from '@kinpath/engine';
import type { GradeScaleModel } from '../grade-scale/grade-scale.model';
import type { PrerequisiteNode } from '../imports/validation/prerequisites';

/** A catalogue course as the advising routes need it, prerequisites parsed once per model. */
export interface CatalogueEntry {
  courseCode: string;
  title: string;
  department: string;
  credits: number | null;
  elective: boolean;
  prerequisites: PrerequisiteNode | null;
}

/**
 * Everything the advising routes read that only term data changes: the engine
 * model and the catalogue, offerings, grade scale and terms it was built with.
 * Immutable once built; a rebuild makes a new one.
 */
export interface ModelSnapshot {
  model: Model;
  /** The validated records the model was built from, kept for likely-range calibration. */
  table: RecordTable;
  /** Likely-range tables per settings version, made on first use (see ModelService.ranges). */
  ranges: Map<number, Partial<Record<Signal, RangeTable>>>;
  builtAt: Date;
  scale: GradeScaleModel;
  courses: ReadonlyMap<string, CatalogueEntry>;
  /** Electives of the catalogue, by course code. */
  electives: readonly CatalogueEntry[];
  /** Course codes offered, per term. */
  offerings: ReadonlyMap<string, ReadonlySet<string>>;
  terms: TermsResponse;
  students: number;
  records: number;
}

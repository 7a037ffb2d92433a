/**
 * The grade scale as `GET/PUT /api/grade-scale` carries it: letters with grade
 * points (best first), marks without points, and the lowest passing letter.
 */
export interface GradeScaleLetter {
  letter: string;
  points: number;
}

export interface GradeScaleMark {
  letter: string;
  /** Among the default marks only P passes. */
  passing: boolean;
}

export interface GradeScale {
  letters: GradeScaleLetter[];
  marks: GradeScaleMark[];
  /** The lowest letter that passes; letters with at least its points pass. */
  passingThreshold: string;
  /** The scale's range, which bounds grades given as numbers and every predicted grade. */
  minPoints: number;
  maxPoints: number;
}

export type UpdateGradeScaleRequest = Pick<GradeScale, 'letters' | 'marks' | 'passingThreshold'>;

/** The answer to `PUT /api/grade-scale`: the new scale and how many stored records were re-derived. */
export interface UpdateGradeScaleResponse extends GradeScale {
  recordsUpdated: number;
}

export const DEFAULT_PASSING_THRESHOLD = 'D-';

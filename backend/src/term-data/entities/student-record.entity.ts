import { Column, Entity, PrimaryColumn } from 'typeorm';
import { numericTransformer } from '../../database/numeric.transformer';

/** One attempt of one course by one student in one term (table `records`). */
@Entity({ name: 'records' })
export class StudentRecord {
  @PrimaryColumn({ name: 'student_pseudonym', type: 'text' })
  studentPseudonym: string;

  @PrimaryColumn({ type: 'text' })
  term: string;

  @PrimaryColumn({ name: 'course_code', type: 'text' })
  courseCode: string;

  /** The grade as given: a letter, a mark or a number. */
  @Column({ type: 'text' })
  grade: string;

  /** Derived from the grade scale; null for marks. */
  @Column({
    name: 'grade_points',
    type: 'numeric',
    precision: 5,
    scale: 2,
    nullable: true,
    transformer: numericTransformer,
  })
  gradePoints: number | null;

  @Column({ type: 'smallint', nullable: true })
  satisfaction: number | null;

  @Column({
    name: 'credits_attempted',
    type: 'numeric',
    precision: 5,
    scale: 2,
    nullable: true,
    transformer: numericTransformer,
  })
  creditsAttempted: number | null;

  @Column({ name: 'import_id', type: 'uuid', nullable: true })
  importId: string | null;
}

import { Column, Entity, PrimaryColumn } from 'typeorm';
import { numericTransformer } from '../../database/numeric.transformer';

@Entity({ name: 'courses' })
export class Course {
  /** Normal form `CMP 2310`. */
  @PrimaryColumn({ name: 'course_code', type: 'text' })
  courseCode: string;

  @Column({ type: 'text' })
  title: string;

  @Column({ type: 'text' })
  department: string;

  @Column({
    type: 'numeric',
    precision: 5,
    scale: 2,
    nullable: true,
    transformer: numericTransformer,
  })
  credits: number | null;

  @Column({ type: 'text', nullable: true })
  level: string | null;

  @Column({ type: 'boolean', default: true })
  elective: boolean;

  /** Course codes joined by AND / OR with parentheses; empty means none. */
  @Column({ type: 'text', default: '' })
  prerequisites: string;

  @Column({ type: 'text', nullable: true })
  description: string | null;

  @Column({ name: 'import_id', type: 'uuid', nullable: true })
  importId: string | null;
}

import { Column, Entity, PrimaryColumn } from 'typeorm';
import { numericTransformer } from '../../database/numeric.transformer';

/** One letter or mark of the institution's grade scale. */
@Entity({ name: 'grade_scale' })
export class GradeScaleEntryEntity {
  @PrimaryColumn({ type: 'text' })
  letter: string;

  /** Null for a mark (W, I, IP, AU, P, NP). */
  @Column({
    type: 'numeric',
    precision: 5,
    scale: 2,
    nullable: true,
    transformer: numericTransformer,
  })
  points: number | null;

  @Column({ type: 'boolean' })
  passing: boolean;

  @Column({ name: 'sort_order', type: 'smallint' })
  sortOrder: number;
}

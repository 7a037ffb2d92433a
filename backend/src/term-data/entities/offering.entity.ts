import { Column, Entity, PrimaryColumn } from 'typeorm';

@Entity({ name: 'offerings' })
export class Offering {
  @PrimaryColumn({ type: 'text' })
  term: string;

  @PrimaryColumn({ name: 'course_code', type: 'text' })
  courseCode: string;

  @Column({ type: 'integer', nullable: true })
  sections: number | null;

  @Column({ type: 'integer' })
  capacity: number;

  @Column({ name: 'import_id', type: 'uuid', nullable: true })
  importId: string | null;
}

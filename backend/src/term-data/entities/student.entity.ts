import type { StudentStatus } from '@kinpath/contracts';
import { Column, Entity, PrimaryColumn } from 'typeorm';

/** A student known only by pseudonym: the HMAC of the student number, never the number. */
@Entity({ name: 'students' })
export class Student {
  @PrimaryColumn({ type: 'text' })
  pseudonym: string;

  @Column({ type: 'text', nullable: true })
  program: string | null;

  @Column({ name: 'entry_term', type: 'text', nullable: true })
  entryTerm: string | null;

  @Column({ type: 'text', default: 'active' })
  status: StudentStatus;

  @Column({ name: 'import_id', type: 'uuid', nullable: true })
  importId: string | null;
}

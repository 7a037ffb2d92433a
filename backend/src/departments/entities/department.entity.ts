import { Column, CreateDateColumn, Entity, PrimaryColumn } from 'typeorm';

/** A department an admin added ahead of the catalogue; the catalogue's own come from courses. */
@Entity({ name: 'departments' })
export class Department {
  @PrimaryColumn({ type: 'text' })
  code: string;

  @Column({ type: 'text', nullable: true })
  name: string | null;

  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' })
  createdAt: Date;
}

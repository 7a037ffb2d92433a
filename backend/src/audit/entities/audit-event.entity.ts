import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** One line of the audit trail. The table refuses UPDATE and DELETE (see the migration). */
@Entity({ name: 'audit_events' })
export class AuditEvent {
  @PrimaryGeneratedColumn({ type: 'bigint' })
  id: string;

  @Column({ type: 'timestamptz', default: () => 'now()' })
  at: Date;

  @Column({ name: 'actor_id', type: 'uuid', nullable: true })
  actorId: string | null;

  @Column({ name: 'actor_email', type: 'text', nullable: true })
  actorEmail: string | null;

  @Column({ type: 'text' })
  action: string;

  @Column({ type: 'text', nullable: true })
  target: string | null;

  @Column({ type: 'jsonb', default: () => "'{}'::jsonb" })
  detail: Record<string, unknown>;
}

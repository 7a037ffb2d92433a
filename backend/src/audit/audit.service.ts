import { Injectable } from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import { type EntityManager, MoreThan, type Repository } from 'typeorm';
import type { User } from '../users/entities/user.entity';
import type { AuditAction } from './audit-actions';
import { AuditEvent } from './entities/audit-event.entity';
import { viaApiToken } from '../api-tokens/token-actor';

export interface AuditEntry {
  /** Who acted; null for a system action. An e-mail alone records an unknown or failed actor. */
  actor: Pick<User, 'id' | 'email'> | { id?: null; email: string } | null;
  action: AuditAction;
  target?: string | null;
  /** Never a password, a token or a student number. */
  detail?: Record<string, unknown>;
}

@Injectable()
export class AuditService {
  constructor(@InjectRepository(AuditEvent) private readonly events: Repository<AuditEvent>) {}

  /** How many events of this action one user caused since the given time. */
  countSince(actorId: string, action: AuditAction, since: Date): Promise<number> {
    return this.events.count({ where: { actorId, action, at: MoreThan(since) } });
  }

  /** Appends one event; pass `manager` to write it inside the caller's transaction. */
  async record(entry: AuditEntry, manager?: EntityManager): Promise<void> {
    const repository = manager ? manager.getRepository(AuditEvent) : this.events;
    // An action done with a script token names the token beside its owner.
    const token = viaApiToken(entry.actor);
    const event = repository.create({
      actorId: entry.actor?.id ?? null,
      actorEmail: entry.actor?.email ?? null,
      action: entry.action,
      target: entry.target ?? null,
      detail: token
        ? { ...entry.detail, apiToken: token.name, apiTokenId: token.id }
        : (entry.detail ?? {}),
    });
    // One INSERT: by default save() wraps each row in a transaction of its own.
    await repository.save(event, { reload: false, transaction: false });
  }
}

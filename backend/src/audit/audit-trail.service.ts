import type { AuditEntry, AuditPage } from '@kinpath/contracts';
import { BadRequestException, Injectable } from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { Repository, SelectQueryBuilder } from 'typeorm';
import type { User } from '../users/entities/user.entity';
import { AUDIT_ACTIONS } from './audit-actions';
import { AuditService } from './audit.service';
import type { AuditQueryDto } from './dto/audit-query.dto';
import { AuditEvent } from './entities/audit-event.entity';

/** An export holds at most this many lines; narrower filters give the rest. */
export const AUDIT_EXPORT_MAX_ROWS = 100_000;

/** The read side of the audit trail: filtered pages and exports, newest first. */
@Injectable()
export class AuditTrailService {
  constructor(
    @InjectRepository(AuditEvent) private readonly events: Repository<AuditEvent>,
    private readonly audit: AuditService,
  ) {}

  async page(query: AuditQueryDto): Promise<AuditPage> {
    const page = query.page ?? 1;
    const pageSize = query.pageSize ?? 50;
    const [rows, total] = await this.filtered(query)
      .orderBy('event.at', 'DESC')
      .addOrderBy('event.id', 'DESC')
      .offset((page - 1) * pageSize)
      .limit(pageSize)
      .getManyAndCount();
    const actions: Array<{ action: string }> = await this.events.query(
      `SELECT DISTINCT action FROM audit_events ORDER BY action`,
    );
    return {
      items: rows.map(toEntry),
      total,
      page,
      pageSize,
      actions: actions.map((a) => a.action),
    };
  }

  /** Every matching line for a CSV export; the export itself goes on the trail. */
  async export(actor: User, query: AuditQueryDto): Promise<AuditEntry[]> {
    const rows = await this.filtered(query)
      .orderBy('event.at', 'DESC')
      .addOrderBy('event.id', 'DESC')
      .limit(AUDIT_EXPORT_MAX_ROWS)
      .getMany();
    await this.audit.record({
      actor,
      action: AUDIT_ACTIONS.auditExported,
      detail: {
        filters: { action: query.action, actor: query.actor, from: query.from, to: query.to },
        rows: rows.length,
      },
    });
    return rows.map(toEntry);
  }

  private filtered(query: AuditQueryDto): SelectQueryBuilder<AuditEvent> {
    const qb = this.events.createQueryBuilder('event');
    if (query.action) qb.andWhere('event.action = :action', { action: query.action });
    if (query.actor?.trim()) {
      const pattern = `%${query.actor
        .trim()
        .toLowerCase()
        .replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      qb.andWhere('lower(event.actor_email) LIKE :actor', { actor: pattern });
    }
    const from = query.from ? moment(query.from, 'start') : null;
    const to = query.to ? moment(query.to, 'end') : null;
    if (from && to && from > to) {
      throw new BadRequestException('The date range ends before it starts.');
    }
    if (from) qb.andWhere('event.at >= :from', { from });
    if (to) qb.andWhere('event.at < :to', { to });
    return qb;
  }
}

/** A date alone covers its whole day (UTC): `from` its start, `to` up to the next day. */
function moment(value: string, edge: 'start' | 'end'): Date {
  const dateOnly = /^\d{4}-\d{2}-\d{2}$/.test(value);
  const date = new Date(dateOnly ? `${value}T00:00:00Z` : value);
  if (Number.isNaN(date.getTime())) throw new BadRequestException(`'${value}' is not a date.`);
  if (dateOnly && edge === 'end') date.setUTCDate(date.getUTCDate() + 1);
  // A moment given to the second or millisecond includes that moment.
  if (!dateOnly && edge === 'end') date.setTime(date.getTime() + 1);
  return date;
}

function toEntry(event: AuditEvent): AuditEntry {
  return {
    id: String(event.id),
    at: event.at.toISOString(),
    actorId: event.actorId,
    actorEmail: event.actorEmail,
    action: event.action,
    target: event.target,
    detail: event.detail ?? {},
  };
}

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
    const filtered = this.filtered(query);
    const total = await filtered.getCount();
    const rows = await labelled(
      filtered
        .orderBy('event.at', 'DESC')
        .addOrderBy('event.id', 'DESC')
        .offset((page - 1) * pageSize)
        .limit(pageSize),
    );
    const actions: Array<{ action: string }> = await this.events.query(
      `SELECT DISTINCT action FROM audit_events ORDER BY action`,
    );
    return {
      items: rows,
      total,
      page,
      pageSize,
      actions: actions.map((a) => a.action),
    };
  }

  /** Every matching line for a CSV export; the export itself goes on the trail. */
  async export(actor: User, query: AuditQueryDto): Promise<AuditEntry[]> {
    const rows = await labelled(
      this.filtered(query)
        .orderBy('event.at', 'DESC')
        .addOrderBy('event.id', 'DESC')
        .limit(AUDIT_EXPORT_MAX_ROWS),
    );
    await this.audit.record({
      actor,
      action: AUDIT_ACTIONS.auditExported,
      detail: {
        filters: {
          action: query.action,
          actor: query.actor,
          target: query.target,
          from: query.from,
          to: query.to,
        },
        rows: rows.length,
      },
    });
    return rows;
  }

  private filtered(query: AuditQueryDto): SelectQueryBuilder<AuditEvent> {
    // Targets are ids: an account's or an import's is named from its own table.
    const qb = this.events
      .createQueryBuilder('event')
      .leftJoin('users', 'target_user', 'target_user.id::text = event.target')
      .leftJoin('imports', 'target_import', 'target_import.id::text = event.target');
    if (query.action) qb.andWhere('event.action = :action', { action: query.action });
    if (query.actor?.trim()) {
      qb.andWhere('lower(event.actor_email) LIKE :actor', { actor: containing(query.actor) });
    }
    if (query.target?.trim()) {
      qb.andWhere(`(lower(${TARGET_LABEL}) LIKE :target OR lower(event.target) LIKE :target)`, {
        target: containing(query.target),
      });
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

/** The target in words: an account's e-mail, an import's file name, else the target itself. */
const TARGET_LABEL = `coalesce(target_user.email, target_import.file_name, event.target)`;

/** A LIKE pattern for "contains", case-insensitive, with LIKE's own signs taken literally. */
function containing(text: string): string {
  return `%${text
    .trim()
    .toLowerCase()
    .replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** The page's events with their target's name beside each. */
async function labelled(qb: SelectQueryBuilder<AuditEvent>): Promise<AuditEntry[]> {
  const { entities, raw } = await qb
    .addSelect(TARGET_LABEL, 'target_label')
    .getRawAndEntities<{ target_label: string | null }>();
  return entities.map((event, i) => toEntry(event, targetLabel(event, raw[i]?.target_label)));
}

/** Named targets keep their name; the stored kinds of target get words of their own. */
function targetLabel(event: AuditEvent, named: string | null | undefined): string | null {
  const target = event.target;
  if (!target) return null;
  if (named && named !== target) return named;
  if (target === 'grade_scale') return 'Grade scale';
  const settings = /^model_settings:(\d+)$/.exec(target);
  if (settings) return `Model settings, version ${settings[1]}`;
  if (target.startsWith('model_evaluation:')) return 'Backtest of model settings';
  // A student's ref is an opaque handle, never the student number; its start tells lines apart.
  if (event.action.startsWith('student.')) {
    const course = event.detail?.courseCode;
    return `Student ${target.slice(0, 8)}${typeof course === 'string' ? `, ${course}` : ''}`;
  }
  return target;
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

function toEntry(event: AuditEvent, label: string | null): AuditEntry {
  return {
    id: String(event.id),
    at: event.at.toISOString(),
    actorId: event.actorId,
    actorEmail: event.actorEmail,
    action: event.action,
    target: event.target,
    targetLabel: label,
    detail: event.detail ?? {},
  };
}

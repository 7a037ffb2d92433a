import type { SummaryResponse } from '@kinpath/contracts';
import { normalizeCourseCode } from '@kinpath/contracts';
import {
  BadRequestException,
  Injectable,
  Logger,
  ServiceUnavailableException,
} from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { AuditService } from '../audit/audit.service';
import { MailService } from '../mail/mail.service';
import { ModelService } from '../model/model.service';
import type { User } from '../users/entities/user.entity';
import type { SendSummaryDto } from './dto/send-summary.dto';
import { ElectivesService } from './electives.service';
import { StudentsService } from './students.service';
import { auditAction, STUDENT_AUDIT } from './students-audit';
import { StudentNumberCheck } from './student-number-check';
import { composeSummary } from './summary-text';

/** The advising summary e-mail to a student. */
@Injectable()
export class SummaryService {
  private readonly logger = new Logger(SummaryService.name);

  constructor(
    private readonly students: StudentsService,
    private readonly electives: ElectivesService,
    private readonly model: ModelService,
    private readonly mail: MailService,
    private readonly audit: AuditService,
    private readonly numbers: StudentNumberCheck,
    @InjectDataSource() private readonly dataSource: DataSource,
  ) {}

  async send(
    ref: string,
    dto: SendSummaryDto,
    actor: Pick<User, 'id' | 'email' | 'displayName'>,
  ): Promise<SummaryResponse> {
    await this.students.find(ref);
    const snapshot = await this.model.current();
    const codes: string[] = [];
    for (const value of dto.courseCodes) {
      const code = normalizeCourseCode(value);
      if (!code || !snapshot.courses.has(code)) {
        throw new BadRequestException(`'${value}' is not a course of the catalogue.`);
      }
      if (!codes.includes(code)) codes.push(code);
    }
    const message = dto.message?.trim() || null;
    if (message && (await this.numbers.mentionsStudent(message))) {
      throw new BadRequestException(
        'The message contains a student number; remove it, as the summary must not carry one.',
      );
    }
    const estimates = await this.electives.estimates(ref, dto.term, { courseCodes: codes });
    const mail = composeSummary({
      term: estimates.term,
      advisorName: actor.displayName,
      advisorEmail: actor.email,
      message,
      electives: estimates.electives,
    });
    try {
      await this.mail.send({ to: dto.to, ...mail, replyTo: actor.email });
    } catch (error) {
      this.logger.error(`An advising summary could not be sent: ${(error as Error).message}`);
      throw new ServiceUnavailableException(
        'The e-mail could not be sent: the mail server did not accept it. Try again in a moment.',
      );
    }
    const sentAt = new Date();
    // Listed on the student page for advisors; the trail keeps what was sent, not where.
    await this.dataSource.query(
      `INSERT INTO sent_summaries (student_ref, sender_id, to_address, term, course_codes, sent_at)
       VALUES ($1, $2, $3, $4, $5, $6)`,
      [ref, actor.id, dto.to, estimates.term, codes, sentAt],
    );
    await this.audit.record({
      actor,
      action: auditAction(STUDENT_AUDIT.summarySent),
      target: ref,
      detail: {
        term: estimates.term,
        courseCodes: codes,
        settingsVersion: estimates.settingsVersion,
      },
    });
    return {
      to: dto.to,
      subject: mail.subject,
      term: estimates.term,
      courseCodes: codes,
      sentAt: sentAt.toISOString(),
    };
  }
}

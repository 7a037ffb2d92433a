import { BadRequestException, Injectable, Logger } from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { Repository } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { endUserSessions } from '../auth/sessions';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { MailService } from '../mail/mail.service';
import { consumeToken, issueToken, peekToken } from './account-tokens';
import { passwordResetMail } from './account-mail';
import { User } from './entities/user.entity';
import { LINK_NOT_USABLE } from './invitations.service';
import { hashPassword } from './passwords';

export const RESET_REQUESTED =
  'If an active account uses this address, a link to choose a new password is on its way. It works once, for one hour.';

/** Reset links e-mailed to one account in an hour; further requests send nothing. */
export const RESET_MAILS_PER_HOUR = 3;

/** Password reset by e-mail: a single-use link valid one hour. */
@Injectable()
export class PasswordResetService {
  private readonly logger = new Logger(PasswordResetService.name);

  constructor(
    @InjectRepository(User) private readonly users: Repository<User>,
    private readonly audit: AuditService,
    private readonly mail: MailService,
    @InjectConfig() private readonly config: AppConfig,
  ) {}

  /**
   * Answers at once and the same way for every address; the look-up and the e-mail
   * happen afterwards, so neither the reply nor its timing tells whether an account exists.
   */
  request(email: string, address: string): { message: string } {
    void this.sendLink(email.trim().toLowerCase(), address).catch((error: unknown) =>
      this.logger.error(`A password reset e-mail failed: ${(error as Error)?.message ?? error}`),
    );
    return { message: RESET_REQUESTED };
  }

  /** Whether a reset link can still set a password, without spending it. */
  async check(token: string): Promise<{ email: string }> {
    const userId = await peekToken(this.users.manager, token, 'password_reset');
    const user = userId ? await this.users.findOneBy({ id: userId }) : null;
    if (!user || !user.active) throw new BadRequestException(LINK_NOT_USABLE);
    return { email: user.email };
  }

  async confirm(token: string, password: string): Promise<{ email: string }> {
    return this.users.manager.transaction(async (manager) => {
      const userId = await consumeToken(manager, token, 'password_reset');
      if (!userId) throw new BadRequestException(LINK_NOT_USABLE);
      const repository = manager.getRepository(User);
      const user = await repository
        .createQueryBuilder('user')
        .addSelect('user.passwordHash')
        .setLock('pessimistic_write')
        .where('user.id = :id', { id: userId })
        .getOne();
      if (!user || !user.active) throw new BadRequestException(LINK_NOT_USABLE);
      user.passwordHash = await hashPassword(password);
      // Whoever knew the old password is signed out everywhere.
      user.tokenVersion += 1;
      await repository.save(user);
      await endUserSessions(manager, user.id, 'password_changed');
      await this.audit.record(
        {
          actor: { id: user.id, email: user.email },
          action: AUDIT_ACTIONS.passwordResetCompleted,
          target: user.id,
        },
        manager,
      );
      return { email: user.email };
    });
  }

  private async sendLink(email: string, address: string): Promise<void> {
    const user = await this.users
      .createQueryBuilder('user')
      .addSelect('user.passwordHash')
      .where('user.email = :email', { email })
      .getOne();
    const eligible = Boolean(user && user.active && user.passwordHash);
    // The cap is checked and the link issued under a lock on the account, so a burst of
    // requests cannot all pass the count at once.
    const issued =
      user && eligible
        ? await this.users.manager.transaction(async (manager) => {
            await manager.query(`SELECT 1 FROM users WHERE id = $1 FOR UPDATE`, [user.id]);
            const rows: Array<{ n: number }> = await manager.query(
              `SELECT count(*)::int AS n FROM account_tokens
               WHERE user_id = $1 AND purpose = 'password_reset'
                 AND created_at > now() - interval '1 hour'`,
              [user.id],
            );
            if ((rows[0]?.n ?? 0) >= RESET_MAILS_PER_HOUR) return null;
            return issueToken(manager, user.id, 'password_reset');
          })
        : null;
    await this.audit.record({
      actor: user ? { id: user.id, email: user.email } : { email: email.slice(0, 254) },
      action: AUDIT_ACTIONS.passwordResetRequested,
      target: user?.id ?? null,
      detail: { sent: issued !== null, address, ...(eligible && !issued ? { capped: true } : {}) },
    });
    if (!user || !issued) return;
    await this.mail.send(
      passwordResetMail(user.email, `${this.config.publicUrl}/reset-password/${issued.token}`),
    );
  }
}

import {
  BadRequestException,
  ConflictException,
  Injectable,
  NotFoundException,
} from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { Repository } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { MailService } from '../mail/mail.service';
import { consumeToken, issueToken, peekToken, revokeOpenTokens } from './account-tokens';
import { invitationMail } from './account-mail';
import { User } from './entities/user.entity';
import { hashPassword } from './passwords';

export const LINK_NOT_USABLE =
  'This link cannot be used: it has expired, was used already, or was replaced by a newer one. Ask for a new one.';

/**
 * Invitations: an account created without a password gets a single-use link by
 * e-mail, valid 72 hours, through which its owner sets the password and activates it.
 */
@Injectable()
export class InvitationsService {
  constructor(
    @InjectRepository(User) private readonly users: Repository<User>,
    private readonly audit: AuditService,
    private readonly mail: MailService,
    @InjectConfig() private readonly config: AppConfig,
  ) {}

  /** Issues a new link (ending older ones) and e-mails it. */
  async send(actor: User, userId: string): Promise<{ expiresAt: string }> {
    const user = await this.pendingUser(userId);
    const { token, expiresAt } = await this.users.manager.transaction(async (manager) => {
      const issued = await issueToken(manager, user.id, 'invitation');
      await this.audit.record(
        {
          actor,
          action: AUDIT_ACTIONS.invitationSent,
          target: user.id,
          detail: { email: user.email, expiresAt: issued.expiresAt.toISOString() },
        },
        manager,
      );
      return issued;
    });
    const link = `${this.config.publicUrl}/invitation/${token}`;
    await this.mail.send(invitationMail(user.email, user.displayName, link, expiresAt));
    return { expiresAt: expiresAt.toISOString() };
  }

  async revoke(actor: User, userId: string): Promise<void> {
    const user = await this.pendingUser(userId);
    await this.users.manager.transaction(async (manager) => {
      const revoked = await revokeOpenTokens(manager, user.id, 'invitation');
      await this.audit.record(
        {
          actor,
          action: AUDIT_ACTIONS.invitationRevoked,
          target: user.id,
          detail: { email: user.email, linksEnded: revoked },
        },
        manager,
      );
    });
  }

  /** Whether an invitation link can still set a password, without spending it. */
  async check(token: string): Promise<{ email: string }> {
    const userId = await peekToken(this.users.manager, token, 'invitation');
    const user = userId
      ? await this.users
          .createQueryBuilder('user')
          .addSelect('user.passwordHash')
          .where('user.id = :id', { id: userId })
          .getOne()
      : null;
    if (!user || user.passwordHash !== null) throw new BadRequestException(LINK_NOT_USABLE);
    return { email: user.email };
  }

  /** Sets the password and activates the account; the link is spent either way. */
  async accept(token: string, password: string): Promise<{ email: string }> {
    return this.users.manager.transaction(async (manager) => {
      const userId = await consumeToken(manager, token, 'invitation');
      if (!userId) throw new BadRequestException(LINK_NOT_USABLE);
      const repository = manager.getRepository(User);
      const user = await repository
        .createQueryBuilder('user')
        .addSelect('user.passwordHash')
        .setLock('pessimistic_write')
        .where('user.id = :id', { id: userId })
        .getOne();
      if (!user || user.passwordHash !== null) throw new BadRequestException(LINK_NOT_USABLE);
      user.passwordHash = await hashPassword(password);
      user.active = true;
      await repository.save(user);
      await this.audit.record(
        {
          actor: { id: user.id, email: user.email },
          action: AUDIT_ACTIONS.invitationAccepted,
          target: user.id,
        },
        manager,
      );
      return { email: user.email };
    });
  }

  private async pendingUser(userId: string): Promise<User> {
    const user = await this.users
      .createQueryBuilder('user')
      .addSelect('user.passwordHash')
      .where('user.id = :id', { id: userId })
      .getOne();
    if (!user) throw new NotFoundException('No account has this id.');
    if (user.passwordHash !== null) {
      throw new ConflictException('This account has accepted its invitation already.');
    }
    return user;
  }
}

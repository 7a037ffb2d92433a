import type { CreateUserResponse, Role, UserAccount, UserSummary } from '@kinpath/contracts';
import {
  BadRequestException,
  ConflictException,
  Injectable,
  Logger,
  NotFoundException,
} from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { EntityManager, Repository } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { endUserSessions } from '../auth/sessions';
import { DepartmentsService } from '../departments/departments.service';
import type { CreateUserDto } from './dto/create-user.dto';
import type { UpdateUserDto } from './dto/update-user.dto';
import { User } from './entities/user.entity';
import { InvitationsService } from './invitations.service';
import { hashPassword } from './passwords';

export const HEAD_NEEDS_DEPARTMENT = 'A department head needs a department code such as CMP.';
export const PENDING_INVITATION_NOTICE =
  'An invitation e-mail is on its way: the account becomes active when its owner sets a password through the link (valid 72 hours).';
export const INVITATION_NOT_SENT_NOTICE =
  'The account was created, but the invitation e-mail could not be sent: send it again from the list.';

export interface NewUser {
  email: string;
  displayName: string;
  role: Role;
  department?: string | null;
  /** A plain password; omitted for an account pending invitation. */
  password?: string;
}

@Injectable()
export class UsersService {
  private readonly logger = new Logger(UsersService.name);

  constructor(
    @InjectRepository(User) private readonly users: Repository<User>,
    private readonly audit: AuditService,
    private readonly invitations: InvitationsService,
    private readonly departments: DepartmentsService,
  ) {}

  findById(id: string): Promise<User | null> {
    return this.users.findOneBy({ id });
  }

  /** With the password hash, for sign-in only. */
  findForSignIn(email: string): Promise<User | null> {
    return this.users
      .createQueryBuilder('user')
      .addSelect('user.passwordHash')
      .where('user.email = :email', { email: email.trim().toLowerCase() })
      .getOne();
  }

  /** Whom a deactivated person can ask: the active administrators, oldest first. */
  async activeAdminEmails(limit = 2): Promise<string[]> {
    const admins = await this.users.find({
      select: { email: true },
      where: { role: 'admin', active: true },
      order: { createdAt: 'ASC' },
      take: limit,
    });
    return admins.map((admin) => admin.email);
  }

  count(manager?: EntityManager): Promise<number> {
    return (manager ? manager.getRepository(User) : this.users).count();
  }

  async list(): Promise<UserAccount[]> {
    const users = await this.users
      .createQueryBuilder('user')
      .addSelect('user.passwordHash')
      .orderBy('user.email')
      .getMany();
    return users.map(toAccount);
  }

  async create(actor: User, dto: CreateUserDto): Promise<CreateUserResponse> {
    const user = await this.users.manager.transaction(async (manager) => {
      if (dto.role === 'department_head' && dto.department) {
        await this.departments.assertKnown(dto.department, manager);
      }
      const created = await this.insert(dto, manager);
      await this.audit.record(
        {
          actor,
          action: AUDIT_ACTIONS.userCreated,
          target: created.id,
          detail: {
            email: created.email,
            role: created.role,
            department: created.department,
            pendingInvitation: created.passwordHash === null,
          },
        },
        manager,
      );
      return created;
    });
    const account = toAccount(user);
    if (!account.pendingInvitation) return { ...account, notice: null };
    try {
      await this.invitations.send(actor, user.id);
      return { ...account, notice: PENDING_INVITATION_NOTICE };
    } catch (error) {
      this.logger.error(`An invitation e-mail failed: ${(error as Error)?.message ?? error}`);
      return { ...account, notice: INVITATION_NOT_SENT_NOTICE };
    }
  }

  /**
   * Inserts one account, checking the rules every path into the users table shares
   * (the admin screen, the first administrator, the demo accounts).
   */
  async insert(input: NewUser, manager: EntityManager = this.users.manager): Promise<User> {
    const email = input.email.trim().toLowerCase();
    const department = input.department ?? null;
    if (input.role === 'department_head' && !department) {
      throw new BadRequestException(HEAD_NEEDS_DEPARTMENT);
    }
    const repository = manager.getRepository(User);
    if (await repository.existsBy({ email })) {
      throw new ConflictException(`An account for ${email} exists already.`);
    }
    const passwordHash = input.password ? await hashPassword(input.password) : null;
    const user = repository.create({
      email,
      displayName: input.displayName.trim(),
      role: input.role,
      department,
      passwordHash,
      active: passwordHash !== null,
    });
    try {
      return await repository.save(user);
    } catch (error) {
      if ((error as { code?: string }).code === '23505') {
        throw new ConflictException(`An account for ${email} exists already.`);
      }
      throw error;
    }
  }

  async update(actor: User, id: string, dto: UpdateUserDto): Promise<UserAccount> {
    return this.users.manager.transaction(async (manager) => {
      const repository = manager.getRepository(User);
      const user = await repository
        .createQueryBuilder('user')
        .addSelect('user.passwordHash')
        .setLock('pessimistic_write')
        .where('user.id = :id', { id })
        .getOne();
      if (!user) throw new NotFoundException('No account has this id.');

      const before = { role: user.role, department: user.department, active: user.active };
      const role = dto.role ?? user.role;
      let department = dto.department !== undefined ? dto.department : user.department;
      // A department only scopes heads; a user leaving that role leaves the scope too.
      if (dto.role !== undefined && role !== 'department_head' && dto.department === undefined) {
        department = null;
      }
      if (role === 'department_head' && !department) {
        throw new BadRequestException(HEAD_NEEDS_DEPARTMENT);
      }
      const newScope = role !== user.role || department !== user.department;
      if (role === 'department_head' && department && newScope) {
        await this.departments.assertKnown(department, manager);
      }
      const active = dto.active ?? user.active;
      if (active && user.passwordHash === null) {
        throw new BadRequestException(
          'This account has no password yet: it becomes active when its invitation is accepted.',
        );
      }
      const losesAdmin = user.role === 'admin' && user.active && (role !== 'admin' || !active);
      if (losesAdmin && (await this.countActiveAdmins(manager)) <= 1) {
        throw new ConflictException('Kinpath needs at least one active admin account.');
      }

      user.role = role;
      user.department = department;
      user.active = active;
      if (dto.displayName !== undefined) user.displayName = dto.displayName;
      // Deactivation ends every session at once, and a later reactivation does not revive them.
      if (before.active && !active) user.tokenVersion += 1;
      const saved = await repository.save(user);
      if (before.active && !active) await endUserSessions(manager, saved.id, 'deactivated');

      await this.audit.record(
        {
          actor,
          action: AUDIT_ACTIONS.userUpdated,
          target: saved.id,
          detail: {
            email: saved.email,
            before,
            after: { role: saved.role, department: saved.department, active: saved.active },
          },
        },
        manager,
      );
      return toAccount(saved);
    });
  }

  private countActiveAdmins(manager: EntityManager): Promise<number> {
    return manager.getRepository(User).countBy({ role: 'admin', active: true });
  }
}

export function toSummary(user: User): UserSummary {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    role: user.role,
    department: user.department,
  };
}

/** Needs `passwordHash` selected to tell whether an invitation is pending. */
function toAccount(user: User): UserAccount {
  return {
    ...toSummary(user),
    active: user.active,
    pendingInvitation: user.passwordHash === null,
    createdAt: user.createdAt.toISOString(),
    updatedAt: user.updatedAt.toISOString(),
  };
}

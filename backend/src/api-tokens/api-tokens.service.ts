import {
  API_TOKEN_MAX_DAYS,
  API_TOKEN_OWNER_ROLES,
  API_TOKEN_PREFIX,
  type ApiTokenScope,
  type ApiTokenSummary,
  type CreatedApiToken,
} from '@kinpath/contracts';
import {
  BadRequestException,
  ForbiddenException,
  Injectable,
  NotFoundException,
  UnauthorizedException,
} from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import { createHash, randomBytes } from 'node:crypto';
import type { Repository } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { User } from '../users/entities/user.entity';
import { ApiTokensRepository } from './api-tokens.repository';
import type { CreateApiTokenDto } from './dto/create-api-token.dto';
import type { ApiToken } from './entities/api-token.entity';
import { type TokenActor, VIA_API_TOKEN } from './token-actor';

const DAY_MS = 86_400_000;
export const TOKEN_NOT_VALID =
  'This script token is not valid: it is unknown, revoked or expired, or its owner is no longer active.';
export const TOKEN_NOT_FOR_ROUTE =
  'A script token cannot be used here: none of its scopes opens this route.';

/** SHA-256 of the whole secret; enough for 32 random bytes (see the migration). */
export function secretDigest(secret: string): Buffer {
  return createHash('sha256').update(secret, 'utf8').digest();
}

function stateOf(token: ApiToken, now = Date.now()): ApiTokenSummary['state'] {
  if (token.revokedAt) return 'revoked';
  return token.expiresAt.getTime() <= now ? 'expired' : 'active';
}

function summary(token: ApiToken): ApiTokenSummary {
  return {
    id: token.id,
    name: token.name,
    scopes: token.scopes,
    ownerId: token.ownerId,
    ownerEmail: token.owner?.email ?? '',
    createdAt: token.createdAt.toISOString(),
    expiresAt: token.expiresAt.toISOString(),
    lastUsedAt: token.lastUsedAt?.toISOString() ?? null,
    revokedAt: token.revokedAt?.toISOString() ?? null,
    state: stateOf(token),
  };
}

@Injectable()
export class ApiTokensService {
  constructor(
    private readonly tokens: ApiTokensRepository,
    @InjectRepository(User) private readonly users: Repository<User>,
    private readonly audit: AuditService,
  ) {}

  /** Admins see every token, registrar staff their own. */
  async list(actor: User): Promise<ApiTokenSummary[]> {
    const rows = await this.tokens.list(actor.role === 'admin' ? undefined : actor.id);
    return rows.map(summary);
  }

  async create(actor: User, dto: CreateApiTokenDto): Promise<CreatedApiToken> {
    const ownerId = dto.ownerId ?? actor.id;
    if (ownerId !== actor.id && actor.role !== 'admin') {
      throw new ForbiddenException('You may create script tokens for yourself only.');
    }
    const owner = await this.users.findOne({ where: { id: ownerId } });
    if (!owner || !owner.active) {
      throw new BadRequestException('The owner must be an active account.');
    }
    if (!(API_TOKEN_OWNER_ROLES as readonly string[]).includes(owner.role)) {
      throw new BadRequestException('Only registrar staff and admins may own a script token.');
    }
    const expiresAt = endOfDay(dto.expiresOn);
    const now = Date.now();
    if (expiresAt.getTime() <= now) {
      throw new BadRequestException('Expiry must be today or a later day.');
    }
    if (expiresAt.getTime() > now + (API_TOKEN_MAX_DAYS + 1) * DAY_MS) {
      throw new BadRequestException(`Expiry must be at most ${API_TOKEN_MAX_DAYS} days ahead.`);
    }
    const secret = API_TOKEN_PREFIX + randomBytes(32).toString('base64url');
    const token = await this.tokens.insert({
      name: dto.name,
      ownerId,
      createdBy: actor.id,
      scopes: dto.scopes,
      secretSha256: secretDigest(secret),
      expiresAt,
    });
    await this.audit.record({
      actor,
      action: AUDIT_ACTIONS.apiTokenCreated,
      target: token.id,
      detail: { name: token.name, owner: owner.email, scopes: token.scopes, expiresAt },
    });
    return { token: summary(token), secret };
  }

  async revoke(actor: User, id: string): Promise<ApiTokenSummary> {
    const token = await this.tokens.findById(id);
    if (!token || (actor.role !== 'admin' && token.ownerId !== actor.id)) {
      throw new NotFoundException('No script token of yours has this id.');
    }
    if (!token.revokedAt) {
      await this.tokens.revoke(id);
      await this.audit.record({
        actor,
        action: AUDIT_ACTIONS.apiTokenRevoked,
        target: id,
        detail: { name: token.name, owner: token.owner?.email },
      });
    }
    return summary((await this.tokens.findById(id)) as ApiToken);
  }

  /**
   * The owner for a request bearing this secret, marked with the token for the audit trail;
   * 401 when the token cannot be used at all, 403 when its scopes do not open the route.
   */
  async authenticate(secret: string, routeScopes: readonly ApiTokenScope[]): Promise<TokenActor> {
    const token = await this.tokens.findBySecret(secretDigest(secret));
    if (!token || stateOf(token) !== 'active' || !token.owner?.active) {
      throw new UnauthorizedException(TOKEN_NOT_VALID);
    }
    if (!routeScopes.some((scope) => token.scopes.includes(scope))) {
      throw new ForbiddenException(TOKEN_NOT_FOR_ROUTE);
    }
    await this.tokens.touch(token.id);
    const actor: TokenActor = token.owner;
    actor[VIA_API_TOKEN] = { id: token.id, name: token.name };
    return actor;
  }
}

/** The end (UTC) of the day a YYYY-MM-DD names; a bad date is a 400. */
function endOfDay(day: string): Date {
  const start = new Date(`${day}T00:00:00Z`);
  if (Number.isNaN(start.getTime()) || start.toISOString().slice(0, 10) !== day) {
    throw new BadRequestException('Expiry must be a date such as 2027-03-01.');
  }
  return new Date(start.getTime() + DAY_MS);
}

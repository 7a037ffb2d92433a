import { Injectable } from '@nestjs/common';
import { InjectRepository } from '@nestjs/typeorm';
import type { Repository } from 'typeorm';
import { ApiToken } from './entities/api-token.entity';

/** How often a token's last use is written: a script polling every few seconds adds no load. */
const LAST_USE_RESOLUTION = '1 minute';

@Injectable()
export class ApiTokensRepository {
  constructor(@InjectRepository(ApiToken) private readonly tokens: Repository<ApiToken>) {}

  async insert(token: Omit<ApiToken, 'id' | 'createdAt' | 'lastUsedAt' | 'revokedAt'>) {
    const saved = await this.tokens.save(this.tokens.create(token), { reload: true });
    return this.findById(saved.id) as Promise<ApiToken>;
  }

  /** Newest first, with the owner; `ownerId` limits the list to one owner's tokens. */
  list(ownerId?: string): Promise<ApiToken[]> {
    return this.tokens.find({
      where: ownerId ? { ownerId } : {},
      relations: { owner: true },
      order: { createdAt: 'DESC' },
    });
  }

  findById(id: string): Promise<ApiToken | null> {
    return this.tokens.findOne({ where: { id }, relations: { owner: true } });
  }

  /** The token with this secret digest and its owner, whatever its state. */
  findBySecret(sha256: Buffer): Promise<ApiToken | null> {
    return this.tokens
      .createQueryBuilder('token')
      .innerJoinAndSelect('token.owner', 'owner')
      .where('token.secret_sha256 = :sha256', { sha256 })
      .getOne();
  }

  async revoke(id: string): Promise<void> {
    await this.tokens
      .createQueryBuilder()
      .update()
      .set({ revokedAt: () => 'now()' })
      .where('id = :id AND revoked_at IS NULL', { id })
      .execute();
  }

  /** Notes a use, at most once per LAST_USE_RESOLUTION. */
  async touch(id: string): Promise<void> {
    await this.tokens
      .createQueryBuilder()
      .update()
      .set({ lastUsedAt: () => 'now()' })
      .where(
        `id = :id AND (last_used_at IS NULL OR last_used_at < now() - interval '${LAST_USE_RESOLUTION}')`,
        { id },
      )
      .execute();
  }
}

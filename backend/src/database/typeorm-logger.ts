import { Logger as NestLogger } from '@nestjs/common';
import type { Logger } from 'typeorm';

/**
 * TypeORM's own console logger prints failed queries with their parameters, which
 * may hold password hashes, token hashes or student data. This one goes through
 * Nest's (JSON) logger and names the failure only.
 */
export class TypeOrmSafeLogger implements Logger {
  private readonly logger = new NestLogger('Database');

  logQuery(): void {}

  logQueryError(error: string | Error): void {
    const message = typeof error === 'string' ? error : `${error.name}: ${error.message}`;
    this.logger.error(`Query failed: ${message.split('\n')[0].slice(0, 300)}`);
  }

  logQuerySlow(time: number): void {
    this.logger.warn(`A query took ${time} ms.`);
  }

  logSchemaBuild(): void {}

  logMigration(message: string): void {
    this.logger.log(message);
  }

  log(level: 'log' | 'info' | 'warn', message: unknown): void {
    if (level === 'warn') this.logger.warn(String(message));
  }
}

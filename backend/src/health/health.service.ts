import type { HealthResponse } from '@kinpath/contracts';
import { Injectable } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';

/** A health check must answer quickly even when the database hangs. */
export const DATABASE_CHECK_TIMEOUT_MS = 2000;

@Injectable()
export class HealthService {
  constructor(@InjectDataSource() private readonly dataSource: DataSource) {}

  async check(): Promise<HealthResponse> {
    const up = await this.databaseAnswers();
    return up ? { status: 'ok', database: 'up' } : { status: 'degraded', database: 'down' };
  }

  private async databaseAnswers(): Promise<boolean> {
    let timer: NodeJS.Timeout | undefined;
    const timeout = new Promise<false>((resolve) => {
      timer = setTimeout(() => resolve(false), DATABASE_CHECK_TIMEOUT_MS);
    });
    const query = this.dataSource
      .query('SELECT 1')
      .then(() => true)
      .catch(() => false);
    try {
      return await Promise.race([query, timeout]);
    } finally {
      clearTimeout(timer);
    }
  }
}

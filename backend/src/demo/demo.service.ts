import type { ImportKind } from '@kinpath/contracts';
import { Injectable, Logger } from '@nestjs/common';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { EntityManager } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { ImportsService } from '../imports/imports.service';
import { User } from '../users/entities/user.entity';
import { hashPassword } from '../users/passwords';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo-accounts';

export const DEMO_FILES = ['catalogue.csv', 'offerings.csv', 'students.csv', 'records.csv'];

export interface DemoCounts {
  courses: number;
  offerings: number;
  students: number;
  records: number;
}

/**
 * Loads the demo institution into an empty database: the demo accounts and the
 * four CSV files, in one transaction, through the import path registrar staff use.
 */
@Injectable()
export class DemoService {
  private readonly logger = new Logger(DemoService.name);

  constructor(
    @InjectConfig() private readonly config: AppConfig,
    private readonly imports: ImportsService,
    private readonly audit: AuditService,
  ) {}

  /** Inside the caller's transaction, which must already know the users table is empty. */
  async load(manager: EntityManager): Promise<DemoCounts | null> {
    const started = Date.now();
    const passwordHash = await hashPassword(DEMO_PASSWORD);
    await manager
      .getRepository(User)
      .insert(DEMO_ACCOUNTS.map((account) => ({ ...account, passwordHash, active: true })));

    const dir = this.config.demoDir;
    const missing = DEMO_FILES.filter((file) => !existsSync(join(dir, file)));
    if (missing.length > 0) {
      this.logger.warn(
        `The demo accounts were created, but no term data was loaded: ${missing.join(', ')} not found in KINPATH_DEMO_DIR (${dir}).`,
      );
      return null;
    }

    const counts = await this.loadTermData(manager, dir);
    await this.audit.record(
      { actor: null, action: AUDIT_ACTIONS.demoLoaded, detail: { ...counts } },
      manager,
    );
    this.logger.log(
      `Demo data loaded in ${Date.now() - started} ms: ${counts.courses} courses, ${counts.offerings} offerings, ${counts.students} students, ${counts.records} records.`,
    );
    return counts;
  }

  /**
   * The four files in dependency order, each validated and committed through the
   * import path registrar staff use, inside the caller's transaction: the demo is in
   * place before the server reports healthy. The system loads them, not a person.
   */
  private async loadTermData(manager: EntityManager, dir: string): Promise<DemoCounts> {
    const kinds: ImportKind[] = ['catalogue', 'offerings', 'students', 'records'];
    for (const [index, kind] of kinds.entries()) {
      await this.imports.importInTransaction(manager, join(dir, DEMO_FILES[index]), kind, null);
    }
    const [counts] = (await manager.query(`
      SELECT (SELECT count(*) FROM courses)::int AS courses,
             (SELECT count(*) FROM offerings)::int AS offerings,
             (SELECT count(*) FROM students)::int AS students,
             (SELECT count(*) FROM records)::int AS records`)) as DemoCounts[];
    return counts;
  }
}

import { PASSWORD_MIN_LENGTH } from '@kinpath/contracts';
import { Injectable, Logger, OnApplicationBootstrap } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { AUDIT_ACTIONS } from '../audit/audit-actions';
import { AuditService } from '../audit/audit.service';
import { ConfigError, type AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../demo/demo-accounts';
import { DemoService, type DemoCounts } from '../demo/demo.service';
import { UsersService } from '../users/users.service';

export interface SetupOutcome {
  /** Set when the demo accounts exist, so the start-up message can list them. */
  demo: { accounts: typeof DEMO_ACCOUNTS; password: string } | null;
  /** Set when this start loaded the demo's term data. */
  demoCounts: DemoCounts | null;
  firstAdmin: string | null;
}

/**
 * Makes a new database usable at first start: the demo institution when the demo
 * is on, otherwise one admin account from the environment. Runs only while the
 * users table is empty, under a lock, so two servers starting together agree.
 */
@Injectable()
export class SetupService implements OnApplicationBootstrap {
  private readonly logger = new Logger(SetupService.name);
  outcome: SetupOutcome = { demo: null, demoCounts: null, firstAdmin: null };

  constructor(
    @InjectConfig() private readonly config: AppConfig,
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly users: UsersService,
    private readonly demo: DemoService,
    private readonly audit: AuditService,
  ) {}

  async onApplicationBootstrap(): Promise<void> {
    await this.dataSource.transaction(async (manager) => {
      await manager.query(`SELECT pg_advisory_xact_lock(hashtext('kinpath:first-start'))`);
      if ((await this.users.count(manager)) > 0) {
        if (this.config.demo && (await this.users.findForSignIn(DEMO_ACCOUNTS[0].email))) {
          this.outcome.demo = { accounts: DEMO_ACCOUNTS, password: DEMO_PASSWORD };
        }
        return;
      }

      if (this.config.demo) {
        this.outcome.demoCounts = await this.demo.load(manager);
        this.outcome.demo = { accounts: DEMO_ACCOUNTS, password: DEMO_PASSWORD };
        return;
      }

      const { adminEmail, adminPassword } = this.config;
      if (!adminEmail || !adminPassword) {
        throw new ConfigError(
          'KINPATH_DEMO is off and the database has no account: set KINPATH_ADMIN_EMAIL and KINPATH_ADMIN_PASSWORD to create the first admin.',
        );
      }
      if (adminPassword.length < PASSWORD_MIN_LENGTH) {
        throw new ConfigError(
          `KINPATH_ADMIN_PASSWORD must be at least ${PASSWORD_MIN_LENGTH} characters.`,
        );
      }
      const admin = await this.users.insert(
        { email: adminEmail, displayName: 'Administrator', role: 'admin', password: adminPassword },
        manager,
      );
      await this.audit.record(
        {
          actor: null,
          action: AUDIT_ACTIONS.firstAdminCreated,
          target: admin.id,
          detail: { email: admin.email },
        },
        manager,
      );
      this.outcome.firstAdmin = admin.email;
      this.logger.log(`Created the first admin account, ${admin.email}.`);
    });
  }
}

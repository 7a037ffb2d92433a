import type { DataSourceOptions } from 'typeorm';
import type { DatabaseConfig } from '../config/config';
import { ApiToken } from '../api-tokens/entities/api-token.entity';
import { AuditEvent } from '../audit/entities/audit-event.entity';
import { Department } from '../departments/entities/department.entity';
import { Course } from '../term-data/entities/course.entity';
import { GradeScaleEntryEntity } from '../term-data/entities/grade-scale-entry.entity';
import { Offering } from '../term-data/entities/offering.entity';
import { StudentRecord } from '../term-data/entities/student-record.entity';
import { Student } from '../term-data/entities/student.entity';
import { User } from '../users/entities/user.entity';
import { MIGRATIONS } from './migrations';
import { TypeOrmSafeLogger } from './typeorm-logger';

export const ENTITIES = [
  User,
  AuditEvent,
  Course,
  Offering,
  Student,
  StudentRecord,
  GradeScaleEntryEntity,
  Department,
  ApiToken,
];

/**
 * The one description of the database connection, shared by the server and the
 * migration CLI. Schema changes happen only through migrations, never `synchronize`.
 */
export function dataSourceOptions(db: DatabaseConfig): DataSourceOptions {
  return {
    type: 'postgres',
    host: db.host,
    port: db.port,
    database: db.name,
    username: db.user,
    password: db.password,
    entities: ENTITIES,
    migrations: MIGRATIONS,
    migrationsTableName: 'migrations',
    migrationsTransactionMode: 'each',
    synchronize: false,
    // gen_random_uuid() is built into PostgreSQL 13+; no extension needed.
    installExtensions: false,
    logging: ['error', 'migration'],
    logger: new TypeOrmSafeLogger(),
    applicationName: 'kinpath',
    extra: {
      max: 10,
      // Fail fast when the database is unreachable instead of hanging requests.
      connectionTimeoutMillis: 2000,
      idleTimeoutMillis: 30000,
    },
  };
}

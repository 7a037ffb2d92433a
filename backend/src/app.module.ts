import { Module } from '@nestjs/common';
import { APP_FILTER } from '@nestjs/core';
import { AuditModule } from './audit/audit.module';
import { AuthModule } from './auth/auth.module';
import { CatalogueModule } from './catalogue/catalogue.module';
import { HttpErrorFilter } from './common/http-error.filter';
import { ConfigModule } from './config/config.module';
import { DatabaseModule } from './database/database.module';
import { DepartmentsModule } from './departments/departments.module';
import { EvaluationsModule } from './evaluations/evaluations.module';
import { ForecastsModule } from './forecasts/forecasts.module';
import { GradeScaleModule } from './grade-scale/grade-scale.module';
import { HealthModule } from './health/health.module';
import { ImportsModule } from './imports/imports.module';
import { ModelModule } from './model/model.module';
import { PseudonymModule } from './pseudonym/pseudonym.module';
import { SetupModule } from './setup/setup.module';
import { StudentsModule } from './students/students.module';
import { TermDataModule } from './term-data/term-data.module';
import { UsersModule } from './users/users.module';

@Module({
  imports: [
    ConfigModule,
    DatabaseModule,
    AuditModule,
    PseudonymModule,
    TermDataModule,
    DepartmentsModule,
    UsersModule,
    AuthModule,
    HealthModule,
    SetupModule,
    ImportsModule,
    GradeScaleModule,
    CatalogueModule,
    ModelModule,
    EvaluationsModule,
    StudentsModule,
    ForecastsModule,
  ],
  providers: [{ provide: APP_FILTER, useClass: HttpErrorFilter }],
})
export class AppModule {}

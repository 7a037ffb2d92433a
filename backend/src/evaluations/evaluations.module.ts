import { Module } from '@nestjs/common';
import { CatalogueService } from '../catalogue/catalogue.service';
import { ModelModule } from '../model/model.module';
import { TermDataModule } from '../term-data/term-data.module';
import { EvaluationJobs } from './evaluation-jobs';
import { EvaluationsController } from './evaluations.controller';
import { EvaluationsService } from './evaluations.service';

/** Backtests of model configurations (`/api/model/evaluations`). */
@Module({
  imports: [ModelModule, TermDataModule],
  controllers: [EvaluationsController],
  // The catalogue's own service, for its definition of the last completed term.
  providers: [EvaluationsService, EvaluationJobs, CatalogueService],
})
export class EvaluationsModule {}

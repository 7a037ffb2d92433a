import { Module } from '@nestjs/common';
import { CatalogueService } from '../catalogue/catalogue.service';
import { ModelModule } from '../model/model.module';
import { TermDataModule } from '../term-data/term-data.module';
import { ForecastsController } from './forecasts.controller';
import { ForecastsService } from './forecasts.service';
import { ScoringRunsService } from './scoring-runs.service';

/**
 * The department heads' demand outlook: cohort scoring runs (queued here, scored by worker
 * processes), the forecast, its backtest and the CSV export. ModelModule is imported so its
 * events (model rebuilt, settings changed) can start new runs.
 */
@Module({
  imports: [TermDataModule, ModelModule],
  controllers: [ForecastsController],
  // The catalogue's own service, for its definition of the next term.
  providers: [ForecastsService, ScoringRunsService, CatalogueService],
})
export class ForecastsModule {}

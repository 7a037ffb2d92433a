import { Module } from '@nestjs/common';
import { CatalogueService } from '../catalogue/catalogue.service';
import { ModelModule } from '../model/model.module';
import { TermDataModule } from '../term-data/term-data.module';
import { ForecastsController } from './forecasts.controller';
import { ForecastsService } from './forecasts.service';
import { OutlookRunsService } from './outlook-runs.service';

/**
 * The department heads' demand outlook: outlook runs (queued here, computed by worker
 * processes), the forecast, its backtests and the CSV export. ModelModule is imported so its
 * refresh event (after an import is committed or rolled back) can start a new run.
 */
@Module({
  imports: [TermDataModule, ModelModule],
  controllers: [ForecastsController],
  // The catalogue's own service, for its definition of the next term.
  providers: [ForecastsService, OutlookRunsService, CatalogueService],
})
export class ForecastsModule {}

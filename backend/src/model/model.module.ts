import { Module } from '@nestjs/common';
import { CatalogueService } from '../catalogue/catalogue.service';
import { GradeScaleModule } from '../grade-scale/grade-scale.module';
import { ImportsModule } from '../imports/imports.module';
import { SetupModule } from '../setup/setup.module';
import { TermDataModule } from '../term-data/term-data.module';
import { ModelEvents } from './model-events';
import { ModelSettingsController } from './model-settings.controller';
import { ModelSettingsService } from './model-settings.service';
import { ModelService } from './model.service';

/**
 * The advising model in memory and its settings. SetupModule is imported so
 * Nest runs its start-up hook (which may load the demo) before ours: deeper
 * modules start first, and the first build should see the demo's term data.
 */
@Module({
  imports: [TermDataModule, ImportsModule, SetupModule, GradeScaleModule],
  controllers: [ModelSettingsController],
  // The catalogue's own service, for its definition of the current and next term.
  providers: [ModelService, ModelSettingsService, ModelEvents, CatalogueService],
  exports: [ModelService, ModelSettingsService, ModelEvents],
})
export class ModelModule {}

import { Module } from '@nestjs/common';
import { PseudonymModule } from '../pseudonym/pseudonym.module';
import { ImportJobs } from './import-jobs';
import { ImportsController } from './imports.controller';
import { ImportsService } from './imports.service';
import { TermDataEvents } from './term-data-events';
import { UploadInterceptor } from './upload.interceptor';

/** Registrar imports: upload, validation and commit jobs, rollback, and the term-data event. */
@Module({
  imports: [PseudonymModule],
  controllers: [ImportsController],
  providers: [ImportsService, ImportJobs, TermDataEvents, UploadInterceptor],
  exports: [ImportsService, TermDataEvents],
})
export class ImportsModule {}

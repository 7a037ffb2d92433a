import { Module } from '@nestjs/common';
import { ImportsModule } from '../imports/imports.module';
import { DemoService } from './demo.service';

@Module({
  imports: [ImportsModule],
  providers: [DemoService],
  exports: [DemoService],
})
export class DemoModule {}

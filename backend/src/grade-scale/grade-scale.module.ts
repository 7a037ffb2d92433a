import { Module } from '@nestjs/common';
import { GradeScaleController } from './grade-scale.controller';
import { GradeScaleService } from './grade-scale.service';

@Module({
  controllers: [GradeScaleController],
  providers: [GradeScaleService],
  exports: [GradeScaleService],
})
export class GradeScaleModule {}

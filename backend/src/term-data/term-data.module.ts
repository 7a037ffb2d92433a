import { Module } from '@nestjs/common';
import { TypeOrmModule } from '@nestjs/typeorm';
import { Course } from './entities/course.entity';
import { GradeScaleEntryEntity } from './entities/grade-scale-entry.entity';
import { Offering } from './entities/offering.entity';
import { StudentRecord } from './entities/student-record.entity';
import { Student } from './entities/student.entity';

/** The catalogue, offerings, students, records and grade scale that imports maintain. */
@Module({
  imports: [
    TypeOrmModule.forFeature([Course, Offering, Student, StudentRecord, GradeScaleEntryEntity]),
  ],
  exports: [TypeOrmModule],
})
export class TermDataModule {}

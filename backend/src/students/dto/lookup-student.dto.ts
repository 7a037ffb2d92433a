import type { StudentLookupRequest } from '@kinpath/contracts';
import { ApiProperty } from '@nestjs/swagger';
import { IsNotEmpty, IsString, MaxLength } from 'class-validator';

export class LookupStudentDto implements StudentLookupRequest {
  // Messages never repeat the value: a student number must not reach a log or a response.
  @ApiProperty({ description: 'The student number as the student information system has it.' })
  @IsString({ message: 'studentId must be text.' })
  @IsNotEmpty({ message: 'studentId is required.' })
  @MaxLength(64, { message: 'studentId is at most 64 characters.' })
  studentId: string;
}

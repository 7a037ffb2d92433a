import { ApiPropertyOptional } from '@nestjs/swagger';
import { IsIn, IsOptional, Matches } from 'class-validator';

export class ListCoursesQuery {
  @ApiPropertyOptional({ example: 'CMP' })
  @IsOptional()
  @Matches(/^[A-Za-z]{2,6}$/, { message: 'department is a code of 2 to 6 letters' })
  department?: string;

  @ApiPropertyOptional({ enum: ['true', 'false'] })
  @IsOptional()
  @IsIn(['true', 'false'])
  elective?: string;
}

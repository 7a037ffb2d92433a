import { DEPARTMENT_CODE_PATTERN } from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import { IsOptional, IsString, Matches, MaxLength } from 'class-validator';
import { DEPARTMENT_FORM } from '../../users/dto/create-user.dto';

export class AddDepartmentDto {
  @ApiProperty({ example: 'MUS' })
  @Transform(({ value }) => (typeof value === 'string' ? value.trim().toUpperCase() : value))
  @IsString()
  @Matches(DEPARTMENT_CODE_PATTERN, { message: DEPARTMENT_FORM })
  code: string;

  @ApiPropertyOptional({ example: 'Music' })
  @IsOptional()
  @IsString()
  @MaxLength(120)
  name?: string;
}

import { DEPARTMENT_CODE_PATTERN, ROLES, type Role } from '@kinpath/contracts';
import { ApiPropertyOptional } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import {
  IsBoolean,
  IsIn,
  IsOptional,
  IsString,
  Matches,
  MaxLength,
  MinLength,
  ValidateIf,
} from 'class-validator';
import { DEPARTMENT_FORM } from './create-user.dto';

// Absent fields stay as they are; null is not absent (only department may be cleared).
const present = (_: object, value: unknown) => value !== undefined;

export class UpdateUserDto {
  @ApiPropertyOptional({ enum: ROLES })
  @ValidateIf(present)
  @IsIn(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` })
  role?: Role;

  @ApiPropertyOptional({ example: 'CMP', nullable: true })
  @IsOptional()
  @Transform(({ value }) => (typeof value === 'string' ? value.trim().toUpperCase() : value))
  @ValidateIf((_, value) => value !== null)
  @IsString()
  @Matches(DEPARTMENT_CODE_PATTERN, { message: DEPARTMENT_FORM })
  department?: string | null;

  @ApiPropertyOptional()
  @ValidateIf(present)
  @Transform(({ value }) => (typeof value === 'string' ? value.trim() : value))
  @IsString({ message: 'Display name must be text.' })
  @MinLength(1, { message: 'Display name must not be empty.' })
  @MaxLength(120)
  displayName?: string;

  @ApiPropertyOptional()
  @ValidateIf(present)
  @IsBoolean({ message: 'Active must be true or false.' })
  active?: boolean;
}

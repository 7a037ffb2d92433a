import { AUDIT_PAGE_SIZE_MAX } from '@kinpath/contracts';
import { ApiPropertyOptional } from '@nestjs/swagger';
import { Type } from 'class-transformer';
import { IsInt, IsOptional, IsString, Matches, Max, MaxLength, Min } from 'class-validator';

const DATE_OR_TIME = /^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})?)?$/;
const DATE_MESSAGE = 'must be a date such as 2026-03-01, or a date and time in ISO 8601.';

export class AuditQueryDto {
  @ApiPropertyOptional({ example: 'auth.sign_in_failed', description: 'One action name.' })
  @IsOptional()
  @IsString()
  @MaxLength(100)
  @Matches(/^[a-z_.]+$/, { message: 'Action must be an action name such as auth.sign_in.' })
  action?: string;

  @ApiPropertyOptional({ example: 'advisor@', description: 'Part of the actor’s e-mail address.' })
  @IsOptional()
  @IsString()
  @MaxLength(254)
  actor?: string;

  @ApiPropertyOptional({
    example: 'records.csv',
    description:
      'Part of the target: an account’s e-mail, an import’s file name, a department code, a student ref.',
  })
  @IsOptional()
  @IsString()
  @MaxLength(254)
  target?: string;

  @ApiPropertyOptional({
    example: '2026-03-01',
    description: 'From this moment (a date: its start).',
  })
  @IsOptional()
  @Matches(DATE_OR_TIME, { message: `From ${DATE_MESSAGE}` })
  from?: string;

  @ApiPropertyOptional({
    example: '2026-03-31',
    description: 'Up to this moment (a date: its end).',
  })
  @IsOptional()
  @Matches(DATE_OR_TIME, { message: `To ${DATE_MESSAGE}` })
  to?: string;

  @ApiPropertyOptional({ default: 1, minimum: 1 })
  @IsOptional()
  @Type(() => Number)
  @IsInt({ message: 'Page must be a whole number.' })
  @Min(1)
  @Max(1_000_000)
  page?: number;

  @ApiPropertyOptional({ default: 50, minimum: 1, maximum: AUDIT_PAGE_SIZE_MAX })
  @IsOptional()
  @Type(() => Number)
  @IsInt({ message: 'Page size must be a whole number.' })
  @Min(1)
  @Max(AUDIT_PAGE_SIZE_MAX)
  pageSize?: number;
}

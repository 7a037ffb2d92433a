import { TERM_PATTERN } from '@kinpath/contracts';
import { ApiPropertyOptional } from '@nestjs/swagger';
import { Type } from 'class-transformer';
import { IsNumber, IsOptional, Matches, Max, Min } from 'class-validator';

const TERM_MESSAGE = 'term must look like 2026-FA (WI, SP, SU or FA).';

export class ForecastsQuery {
  @ApiPropertyOptional({ example: '2027-SP', description: 'Default: the next term.' })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: TERM_MESSAGE })
  term?: string;

  @ApiPropertyOptional({
    example: 'CMP',
    description: 'Registrar staff: one department. Department heads: only their own (else 403).',
  })
  @IsOptional()
  @Matches(/^[A-Za-z]{2,6}$/, { message: 'department must be a department code such as CMP.' })
  department?: string;

  @ApiPropertyOptional({
    example: 10,
    description: 'An elective expected to draw fewer students than this is flagged at risk.',
  })
  @IsOptional()
  @Type(() => Number)
  @IsNumber({}, { message: 'atRiskBelow must be a number.' })
  @Min(0, { message: 'atRiskBelow must be 0 or more.' })
  @Max(100000, { message: 'atRiskBelow must be at most 100000.' })
  atRiskBelow?: number;
}

export class BacktestQuery {
  @ApiPropertyOptional({
    example: '2026-FA',
    description: 'The past term to backtest; default: the last completed term.',
  })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: TERM_MESSAGE })
  term?: string;

  @ApiPropertyOptional({ example: 'CMP' })
  @IsOptional()
  @Matches(/^[A-Za-z]{2,6}$/, { message: 'department must be a department code such as CMP.' })
  department?: string;
}

export class OutlookTermDto {
  @ApiPropertyOptional({ example: '2027-SP', description: 'Default: the next term.' })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: TERM_MESSAGE })
  term?: string;
}

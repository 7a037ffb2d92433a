import { TERM_PATTERN } from '@kinpath/contracts';
import { ApiPropertyOptional } from '@nestjs/swagger';
import { IsOptional, Matches } from 'class-validator';

export class ElectivesQuery {
  @ApiPropertyOptional({ example: '2026-FA', description: 'Default: the next term.' })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: 'term must look like 2026-FA (WI, SP, SU or FA).' })
  term?: string;
}

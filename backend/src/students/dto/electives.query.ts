import { TERM_PATTERN } from '@kinpath/contracts';
import { ApiPropertyOptional } from '@nestjs/swagger';
import { IsIn, IsOptional, Matches } from 'class-validator';

export class ElectivesQuery {
  @ApiPropertyOptional({ example: '2026-FA', description: 'Default: the next term.' })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: 'term must look like 2026-FA (WI, SP, SU or FA).' })
  term?: string;

  @ApiPropertyOptional({
    enum: ['true', 'false'],
    description: 'Also list electives not offered in the term (flagged "not offered").',
  })
  @IsOptional()
  @IsIn(['true', 'false'], { message: 'includeNotOffered must be true or false.' })
  includeNotOffered?: 'true' | 'false';
}

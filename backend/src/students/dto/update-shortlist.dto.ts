import type { UpdateShortlistRequest } from '@kinpath/contracts';
import { SHORTLIST_MAX_ITEMS } from '@kinpath/contracts';
import { ApiProperty } from '@nestjs/swagger';
import { ArrayMaxSize, IsArray, IsString, MaxLength } from 'class-validator';

export class UpdateShortlistDto implements UpdateShortlistRequest {
  @ApiProperty({ type: [String], example: ['CMP 3110', 'ART 2210'] })
  @IsArray({ message: 'courseCodes must be a list of course codes.' })
  @ArrayMaxSize(SHORTLIST_MAX_ITEMS, {
    message: `A shortlist holds at most ${SHORTLIST_MAX_ITEMS} courses.`,
  })
  @IsString({ each: true, message: 'each course code must be text.' })
  @MaxLength(16, { each: true, message: 'a course code is at most 16 characters.' })
  courseCodes: string[];
}

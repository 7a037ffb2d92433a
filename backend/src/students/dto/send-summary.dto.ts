import type { SummaryRequest } from '@kinpath/contracts';
import { SHORTLIST_MAX_ITEMS, SUMMARY_MESSAGE_MAX_LENGTH, TERM_PATTERN } from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import {
  ArrayMaxSize,
  ArrayMinSize,
  IsArray,
  IsEmail,
  IsOptional,
  IsString,
  Matches,
  MaxLength,
} from 'class-validator';

export class SendSummaryDto implements SummaryRequest {
  @ApiProperty({ example: 'student@halden.example' })
  @IsEmail({}, { message: 'to must be a valid e-mail address.' })
  @MaxLength(254, { message: 'to is at most 254 characters.' })
  to: string;

  @ApiProperty({ type: [String], example: ['CMP 3110'] })
  @IsArray({ message: 'courseCodes must be a list of course codes.' })
  @ArrayMinSize(1, { message: 'Choose at least one course for the summary.' })
  @ArrayMaxSize(SHORTLIST_MAX_ITEMS, {
    message: `A summary covers at most ${SHORTLIST_MAX_ITEMS} courses.`,
  })
  @IsString({ each: true, message: 'each course code must be text.' })
  @MaxLength(16, { each: true, message: 'a course code is at most 16 characters.' })
  courseCodes: string[];

  @ApiPropertyOptional({ maxLength: SUMMARY_MESSAGE_MAX_LENGTH })
  @IsOptional()
  @IsString({ message: 'message must be text.' })
  @MaxLength(SUMMARY_MESSAGE_MAX_LENGTH, {
    message: `message must be at most ${SUMMARY_MESSAGE_MAX_LENGTH} characters.`,
  })
  message?: string;

  @ApiPropertyOptional({ example: '2026-FA', description: 'Default: the next term.' })
  @IsOptional()
  @Matches(TERM_PATTERN, { message: 'term must look like 2026-FA (WI, SP, SU or FA).' })
  term?: string;
}

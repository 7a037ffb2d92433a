import type { AdvisingNote, SentSummary, Shortlist, SummaryResponse } from '@kinpath/contracts';
import { Body, Controller, Delete, Get, HttpCode, Param, Patch, Post, Put } from '@nestjs/common';
import {
  ApiBadRequestResponse,
  ApiOperation,
  ApiServiceUnavailableResponse,
  ApiTags,
} from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import { RateLimit } from '../auth/rate-limit';
import type { User } from '../users/entities/user.entity';
import { AdvisingService } from './advising.service';
import { CreateNoteDto } from './dto/create-note.dto';
import { SendSummaryDto } from './dto/send-summary.dto';
import { UpdateShortlistDto } from './dto/update-shortlist.dto';
import { SummaryService } from './summary.service';

@ApiTags('students')
@SignedIn()
@Roles('advisor')
@Controller('students')
export class AdvisingController {
  constructor(
    private readonly advising: AdvisingService,
    private readonly summaries: SummaryService,
  ) {}

  @Get(':ref/notes')
  @ApiOperation({ summary: "Advisors' notes on the student, newest first." })
  notes(@Param('ref') ref: string): Promise<AdvisingNote[]> {
    return this.advising.notes(ref);
  }

  @Post(':ref/notes')
  @ApiOperation({ summary: 'Add a dated note (1 to 4000 characters).' })
  @ApiBadRequestResponse({ description: 'Empty or too long.' })
  addNote(
    @Param('ref') ref: string,
    @Body() dto: CreateNoteDto,
    @CurrentUser() user: User,
  ): Promise<AdvisingNote> {
    return this.advising.addNote(ref, dto.text, user);
  }

  @Patch(':ref/notes/:id')
  @ApiOperation({ summary: 'Change a note: its author only (403 for others).' })
  @ApiBadRequestResponse({ description: 'Empty or too long.' })
  editNote(
    @Param('ref') ref: string,
    @Param('id') id: string,
    @Body() dto: CreateNoteDto,
    @CurrentUser() user: User,
  ): Promise<AdvisingNote> {
    return this.advising.editNote(ref, id, dto.text, user);
  }

  @Delete(':ref/notes/:id')
  @HttpCode(204)
  @ApiOperation({ summary: 'Delete a note: its author only (403 for others).' })
  async deleteNote(
    @Param('ref') ref: string,
    @Param('id') id: string,
    @CurrentUser() user: User,
  ): Promise<void> {
    await this.advising.deleteNote(ref, id, user);
  }

  @Get(':ref/summaries')
  @ApiOperation({ summary: 'Summaries e-mailed to the student: when, to whom, which courses.' })
  sentSummaries(@Param('ref') ref: string): Promise<SentSummary[]> {
    return this.advising.sentSummaries(ref);
  }

  @Get(':ref/shortlist')
  @ApiOperation({ summary: "The student's shortlist, with who added each course and when." })
  shortlist(@Param('ref') ref: string): Promise<Shortlist> {
    return this.advising.shortlist(ref);
  }

  @Put(':ref/shortlist')
  @ApiOperation({ summary: 'Replace the shortlist with these course codes.' })
  @ApiBadRequestResponse({ description: 'A code that is not in the catalogue.' })
  replaceShortlist(
    @Param('ref') ref: string,
    @Body() dto: UpdateShortlistDto,
    @CurrentUser() user: User,
  ): Promise<Shortlist> {
    return this.advising.replaceShortlist(ref, dto.courseCodes, user);
  }

  @RateLimit('summaryMail')
  @Post(':ref/summary')
  @HttpCode(200)
  @ApiOperation({
    summary: 'E-mail the student a plain-language summary of these electives with the cautions.',
  })
  @ApiBadRequestResponse({
    description: 'A bad address, an unknown course, or a student number in the message.',
  })
  @ApiServiceUnavailableResponse({ description: 'The mail server did not accept the message.' })
  summary(
    @Param('ref') ref: string,
    @Body() dto: SendSummaryDto,
    @CurrentUser() user: User,
  ): Promise<SummaryResponse> {
    return this.summaries.send(ref, dto, user);
  }
}

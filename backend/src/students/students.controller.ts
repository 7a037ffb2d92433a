import type {
  ElectiveExplanation,
  ElectivesResponse,
  HistoryEntry,
  RecentStudent,
  StudentHeader,
  StudentLookupResponse,
} from '@kinpath/contracts';
import { Body, Controller, Get, HttpCode, Param, Post, Query } from '@nestjs/common';
import { ApiNotFoundResponse, ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import { RateLimit } from '../auth/rate-limit';
import type { User } from '../users/entities/user.entity';
import { ElectivesQuery } from './dto/electives.query';
import { LookupStudentDto } from './dto/lookup-student.dto';
import { ElectivesService } from './electives.service';
import { StudentsService } from './students.service';

@ApiTags('students')
@SignedIn()
@Roles('advisor', 'registrar')
@Controller('students')
export class StudentsController {
  constructor(
    private readonly students: StudentsService,
    private readonly electivesService: ElectivesService,
  ) {}

  @RateLimit('studentLookup')
  @Post('lookup')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Find a student by number; answers the ref to use in later URLs.',
    description: 'The number travels only in this body; it is not stored or logged.',
  })
  @ApiNotFoundResponse({ description: 'No records for this student number.' })
  lookup(@Body() dto: LookupStudentDto, @CurrentUser() user: User): Promise<StudentLookupResponse> {
    return this.students.lookup(dto.studentId, user);
  }

  @Get('recent')
  @ApiOperation({ summary: 'Your latest lookups, newest first (by program and entry term).' })
  recent(@CurrentUser() user: User): Promise<RecentStudent[]> {
    return this.students.recent(user);
  }

  @Get(':ref')
  @ApiOperation({ summary: 'Program, status, entry term, credits earned and grade-point average.' })
  @ApiNotFoundResponse({ description: 'No student has this ref.' })
  header(@Param('ref') ref: string): Promise<StudentHeader> {
    return this.students.header(ref);
  }

  @Get(':ref/history')
  @ApiOperation({ summary: 'Every attempt on record, in term order.' })
  history(@Param('ref') ref: string): Promise<HistoryEntry[]> {
    return this.students.history(ref);
  }

  @Get(':ref/electives')
  @ApiOperation({
    summary: 'The electives offered in the term, with eligibility and estimates for the student.',
    description:
      'Estimates come from the model in force and the settings version named in the answer; the same request gives the same numbers until either changes.',
  })
  electives(
    @Param('ref') ref: string,
    @Query() query: ElectivesQuery,
    @CurrentUser() user: User,
  ): Promise<ElectivesResponse> {
    return this.electivesService.electives(
      ref,
      query.term,
      query.includeNotOffered === 'true',
      user,
    );
  }

  @Get(':ref/electives/:courseCode/explanation')
  @ApiOperation({
    summary:
      'Why an estimate is what it is: kin count, similarities, spread, outcomes, shared courses.',
  })
  explanation(
    @Param('ref') ref: string,
    @Param('courseCode') courseCode: string,
  ): Promise<ElectiveExplanation> {
    return this.electivesService.explanation(ref, courseCode);
  }
}

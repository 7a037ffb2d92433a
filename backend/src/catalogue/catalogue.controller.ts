import type { CourseSummary, TermsResponse } from '@kinpath/contracts';
import { Controller, Get, Query } from '@nestjs/common';
import { ApiOperation, ApiTags } from '@nestjs/swagger';
import { Scopes, SignedIn } from '../auth/decorators';
import { CatalogueService } from './catalogue.service';
import { ListCoursesQuery } from './dto/list-courses.query';

@ApiTags('catalogue')
@SignedIn()
@Controller()
export class CatalogueController {
  constructor(private readonly catalogue: CatalogueService) {}

  @Get('courses')
  @Scopes('courses:read')
  @ApiOperation({ summary: 'The catalogue, optionally of one department or electives only.' })
  courses(@Query() query: ListCoursesQuery): Promise<CourseSummary[]> {
    return this.catalogue.list({
      department: query.department,
      elective: query.elective === undefined ? undefined : query.elective === 'true',
    });
  }

  @Get('terms')
  @Scopes('terms:read')
  @ApiOperation({ summary: 'Known terms in time order, with the current and the next term.' })
  terms(): Promise<TermsResponse> {
    return this.catalogue.terms();
  }
}

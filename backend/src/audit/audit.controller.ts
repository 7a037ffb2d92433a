import type { AuditPage } from '@kinpath/contracts';
import { Controller, Get, Headers, Query, Res } from '@nestjs/common';
import { ApiOkResponse, ApiOperation, ApiProduces, ApiTags } from '@nestjs/swagger';
import type { Response } from 'express';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { auditCsv } from './audit-csv';
import { AuditTrailService } from './audit-trail.service';
import { AuditQueryDto } from './dto/audit-query.dto';

@ApiTags('audit')
@SignedIn()
@Roles('admin', 'registrar')
@Controller('audit')
export class AuditController {
  constructor(private readonly trail: AuditTrailService) {}

  @Get()
  @ApiOperation({
    summary: 'Who did what when, newest first, filtered by action, actor and date range.',
    description:
      'JSON pages by default; with `Accept: text/csv` every matching line (up to 100,000) as CSV, formula prefixes neutralised.',
  })
  @ApiProduces('application/json', 'text/csv')
  @ApiOkResponse({ description: '{ items, total, page, pageSize, actions } or CSV' })
  async list(
    @CurrentUser() user: User,
    @Query() query: AuditQueryDto,
    @Headers('accept') accept: string | undefined,
    @Res({ passthrough: true }) res: Response,
  ): Promise<AuditPage | string> {
    res.setHeader('Cache-Control', 'no-store');
    if (!accept?.includes('text/csv')) return this.trail.page(query);
    const csv = auditCsv(await this.trail.export(user, query));
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader(
      'Content-Disposition',
      `attachment; filename="kinpath-audit-${new Date().toISOString().slice(0, 10)}.csv"`,
    );
    return csv;
  }
}

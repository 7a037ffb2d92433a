import type {
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
  OutlookRunSummary,
} from '@kinpath/contracts';
import { Body, Controller, Get, Headers, HttpCode, Post, Query, Res } from '@nestjs/common';
import { ApiOperation, ApiProduces, ApiTags } from '@nestjs/swagger';
import type { Response } from 'express';
import { CurrentUser, Roles, Scopes, SignedIn } from '../auth/decorators';
import { RateLimit } from '../auth/rate-limit';
import type { User } from '../users/entities/user.entity';
import { BacktestQuery, ForecastsQuery, OutlookTermDto } from './dto/forecasts.query';
import { ForecastsService } from './forecasts.service';
import { OutlookRunsService } from './outlook-runs.service';

function sendCsv(res: Response, term: string | null, csv: string): string {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader(
    'Content-Disposition',
    `attachment; filename="demand-outlook-${term ?? 'no-term'}.csv"`,
  );
  return csv;
}

@ApiTags('demand outlook')
@SignedIn()
@Controller('forecasts')
export class ForecastsController {
  constructor(
    private readonly forecasts: ForecastsService,
    private readonly outlookRuns: OutlookRunsService,
  ) {}

  @Get()
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiProduces('application/json', 'text/csv')
  @ApiOperation({
    summary: 'Expected demand per offered elective against its seats (CSV with Accept: text/csv).',
    description:
      'Department heads see their own department; asking for another answers 403. Flags: over_subscribed (the 80 % interval lies above the seats), no_history (a new elective, never at risk for that alone), at_risk (expected below atRiskBelow, default 10), balanced.',
  })
  async list(
    @Query() query: ForecastsQuery,
    @CurrentUser() user: User,
    @Headers('accept') accept: string | undefined,
    @Res({ passthrough: true }) res: Response,
  ): Promise<CourseForecast[] | string> {
    if (accept?.includes('text/csv')) {
      const { term, csv } = await this.forecasts.forecastCsv(query, user);
      return sendCsv(res, term, csv);
    }
    return this.forecasts.forecast(query, user);
  }

  @Get('export')
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiProduces('text/csv')
  @ApiOperation({
    summary:
      'The demand outlook as CSV for planning; cells that a spreadsheet would run are neutralised.',
  })
  async export(
    @Query() query: ForecastsQuery,
    @CurrentUser() user: User,
    @Res({ passthrough: true }) res: Response,
  ): Promise<string> {
    const { term, csv } = await this.forecasts.forecastCsv(query, user);
    return sendCsv(res, term, csv);
  }

  @Get('about')
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiOperation({
    summary:
      'The outlook term, its imported offerings (a head: their department), the run behind the figures and what drives demand.',
  })
  about(@Query() query: OutlookTermDto, @CurrentUser() user: User): Promise<ForecastAbout> {
    return this.forecasts.about(query.term, user);
  }

  @Get('backtest')
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiOperation({
    summary:
      'Backtests of the last three completed terms: WAPE of the model and three simple forecasts, and interval coverage; per elective for one term.',
    description:
      'terms: one entry per backtest term (whole institution). term (default: the latest of them) gives the per-elective rows and figures over the courses shown.',
  })
  backtest(@Query() query: BacktestQuery, @CurrentUser() user: User): Promise<BacktestResponse> {
    return this.forecasts.backtest(query, user);
  }

  @Get('runs')
  @Roles('registrar')
  @ApiOperation({ summary: 'Outlook runs, newest first, with their progress in terms computed.' })
  runs(): Promise<OutlookRunSummary[]> {
    return this.outlookRuns.list();
  }

  @RateLimit('outlookRun')
  @Post('runs')
  @Roles('registrar')
  @HttpCode(202)
  @ApiOperation({ summary: 'Compute the outlook again now (default: the next term).' })
  async refresh(@Body() dto: OutlookTermDto): Promise<OutlookRunSummary | null> {
    return this.outlookRuns.ensureRun('manual', dto.term, true);
  }
}

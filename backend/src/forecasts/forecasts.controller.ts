import type {
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
  ScoringRunSummary,
} from '@kinpath/contracts';
import { Body, Controller, Get, Headers, HttpCode, Post, Query, Res } from '@nestjs/common';
import { ApiOperation, ApiProduces, ApiTags } from '@nestjs/swagger';
import type { Response } from 'express';
import { CurrentUser, Roles, Scopes, SignedIn } from '../auth/decorators';
import { RateLimit } from '../auth/rate-limit';
import type { User } from '../users/entities/user.entity';
import { BacktestQuery, ForecastsQuery, StartScoringDto } from './dto/forecasts.query';
import { ForecastsService } from './forecasts.service';
import { ScoringRunsService } from './scoring-runs.service';

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
    private readonly runs: ScoringRunsService,
  ) {}

  @Get()
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiProduces('application/json', 'text/csv')
  @ApiOperation({
    summary: 'Expected demand per offered elective against its seats (CSV with Accept: text/csv).',
    description:
      'Department heads see their own department; asking for another answers 403. Flags: over_subscribed (the 80 % interval lies above the seats), at_risk (expected below atRiskBelow, default 10), balanced.',
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
      'The outlook term, its imported offerings, the scoring run behind the figures and how beta was set.',
  })
  about(@Query() query: StartScoringDto, @CurrentUser() user: User): Promise<ForecastAbout> {
    return this.forecasts.about(query.term, user);
  }

  @Get('backtest')
  @Scopes('forecasts:read')
  @Roles('department_head', 'registrar')
  @ApiOperation({
    summary:
      'The forecast of the last completed term (or term) from the data before it, against real enrolments.',
    description:
      'WAPE overall and per course, next to the naive forecast (enrolment when the course last ran).',
  })
  backtest(@Query() query: BacktestQuery, @CurrentUser() user: User): Promise<BacktestResponse> {
    return this.forecasts.backtest(query, user);
  }

  @Get('scoring')
  @Roles('registrar')
  @ApiOperation({ summary: 'Cohort scoring runs, newest first, with their progress in chunks.' })
  scoring(): Promise<ScoringRunSummary[]> {
    return this.runs.list();
  }

  @RateLimit('rescoring')
  @Post('scoring')
  @Roles('registrar')
  @HttpCode(202)
  @ApiOperation({ summary: 'Score the cohort again now (default: the next term).' })
  async rescore(@Body() dto: StartScoringDto): Promise<ScoringRunSummary | null> {
    return this.runs.ensureRun('manual', undefined, dto.term, true);
  }
}

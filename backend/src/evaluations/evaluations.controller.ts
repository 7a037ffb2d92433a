import type { EvaluationAccepted, EvaluationDetail, EvaluationSummary } from '@kinpath/contracts';
import {
  Body,
  Controller,
  Get,
  HttpCode,
  NotFoundException,
  Param,
  ParseUUIDPipe,
  Post,
} from '@nestjs/common';
import {
  ApiAcceptedResponse,
  ApiBadRequestResponse,
  ApiNotFoundResponse,
  ApiOperation,
  ApiTags,
} from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import { RateLimit } from '../auth/rate-limit';
import type { User } from '../users/entities/user.entity';
import { CreateEvaluationDto } from './dto/create-evaluation.dto';
import { EvaluationsService } from './evaluations.service';

@ApiTags('model backtests')
@SignedIn()
@Roles('registrar')
@Controller('model/evaluations')
export class EvaluationsController {
  constructor(private readonly evaluations: EvaluationsService) {}

  @RateLimit('backtest')
  @Post()
  @HttpCode(202)
  @ApiOperation({
    summary: 'Start a backtest of up to 8 configurations.',
    description:
      'Holds out one term (default: the last completed term), predicts its grades and satisfaction from the earlier records with each configuration, and compares them with the four baselines, overall and per department. Runs in the background on the current term data; what advisors see does not change.',
  })
  @ApiAcceptedResponse({ description: '`{ id }` of the queued backtest.' })
  @ApiBadRequestResponse({
    description: 'A configuration is out of range, or the term cannot be held out.',
  })
  create(@Body() dto: CreateEvaluationDto, @CurrentUser() user: User): Promise<EvaluationAccepted> {
    return this.evaluations.create(dto, user);
  }

  @Get()
  @ApiOperation({ summary: 'Past backtests, newest first (without their results).' })
  list(): Promise<EvaluationSummary[]> {
    return this.evaluations.list();
  }

  @Get(':id')
  @ApiOperation({ summary: 'One backtest: status, progress and, once finished, its results.' })
  @ApiNotFoundResponse({ description: 'No such backtest.' })
  get(
    @Param(
      'id',
      new ParseUUIDPipe({
        exceptionFactory: () => new NotFoundException('There is no such backtest.'),
      }),
    )
    id: string,
  ): Promise<EvaluationDetail> {
    return this.evaluations.get(id);
  }
}

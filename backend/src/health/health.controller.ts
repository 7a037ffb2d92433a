import type { HealthResponse } from '@kinpath/contracts';
import { Controller, Get, Res } from '@nestjs/common';
import { ApiOperation, ApiServiceUnavailableResponse, ApiTags } from '@nestjs/swagger';
import type { Response } from 'express';
import { Public } from '../auth/decorators';
import { HealthService } from './health.service';

@ApiTags('health')
@Controller('health')
export class HealthController {
  constructor(private readonly health: HealthService) {}

  @Public()
  @Get()
  @ApiOperation({ summary: 'Whether the server and its database answer.' })
  @ApiServiceUnavailableResponse({ description: '{ status: "degraded", database: "down" }' })
  async get(@Res({ passthrough: true }) res: Response): Promise<HealthResponse> {
    const result = await this.health.check();
    res.status(result.database === 'up' ? 200 : 503);
    res.setHeader('Cache-Control', 'no-store');
    return result;
  }
}

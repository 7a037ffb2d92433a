import type { ModelSettingsResponse, ModelSettingsVersion } from '@kinpath/contracts';
import {
  Body,
  Controller,
  Get,
  HttpCode,
  NotFoundException,
  Param,
  ParseIntPipe,
  Post,
  Put,
} from '@nestjs/common';
import { ApiBadRequestResponse, ApiNotFoundResponse, ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { UpdateModelSettingsDto } from './dto/update-model-settings.dto';
import { ModelSettingsService } from './model-settings.service';

@ApiTags('model settings')
@SignedIn()
@Controller('model/settings')
export class ModelSettingsController {
  constructor(private readonly settings: ModelSettingsService) {}

  @Get()
  @ApiOperation({ summary: 'The model settings in force and their version.' })
  current(): Promise<ModelSettingsResponse> {
    return this.settings.current();
  }

  @Put()
  @Roles('registrar')
  @ApiOperation({
    summary: 'Change the model settings.',
    description:
      'Every setting is sent. A change becomes a new version, recorded with who and when in the audit trail; the same settings again keep the version in force.',
  })
  @ApiBadRequestResponse({ description: 'A setting is out of its range.' })
  update(
    @Body() dto: UpdateModelSettingsDto,
    @CurrentUser() user: User,
  ): Promise<ModelSettingsResponse> {
    const { note, ...settings } = dto;
    return this.settings.update(settings, note, user);
  }

  @Get('versions')
  @Roles('registrar')
  @ApiOperation({ summary: 'Every settings version, newest first.' })
  versions(): Promise<ModelSettingsVersion[]> {
    return this.settings.versions();
  }

  @Post('versions/:version/restore')
  @Roles('registrar')
  @HttpCode(200)
  @ApiOperation({ summary: 'Put an earlier version back in force, as a new version.' })
  @ApiNotFoundResponse({ description: 'No such version.' })
  restore(
    @Param(
      'version',
      new ParseIntPipe({
        exceptionFactory: () => new NotFoundException('There is no such model settings version.'),
      }),
    )
    version: number,
    @CurrentUser() user: User,
  ): Promise<ModelSettingsResponse> {
    return this.settings.restore(version, user);
  }
}

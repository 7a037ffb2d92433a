import type { ApiTokenSummary, CreatedApiToken } from '@kinpath/contracts';
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
import { ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { ApiTokensService } from './api-tokens.service';
import { CreateApiTokenDto } from './dto/create-api-token.dto';

const tokenIdPipe = new ParseUUIDPipe({
  exceptionFactory: () => new NotFoundException('No script token of yours has this id.'),
});

/** Signed-in people only: no scope opens these routes, so a token cannot make tokens. */
@ApiTags('api-tokens')
@SignedIn()
@Roles('admin', 'registrar')
@Controller('api-tokens')
export class ApiTokensController {
  constructor(private readonly tokens: ApiTokensService) {}

  @Get()
  @ApiOperation({ summary: 'Script tokens: every token for admins, your own for registrar staff.' })
  list(@CurrentUser() actor: User): Promise<ApiTokenSummary[]> {
    return this.tokens.list(actor);
  }

  @Post()
  @ApiOperation({
    summary: 'Create a script token; the answer holds its secret, the only time it is shown.',
  })
  create(@CurrentUser() actor: User, @Body() dto: CreateApiTokenDto): Promise<CreatedApiToken> {
    return this.tokens.create(actor, dto);
  }

  @Post(':id/revoke')
  @HttpCode(200)
  @ApiOperation({ summary: 'Revoke a script token; it stops working at once.' })
  revoke(
    @CurrentUser() actor: User,
    @Param('id', tokenIdPipe) id: string,
  ): Promise<ApiTokenSummary> {
    return this.tokens.revoke(actor, id);
  }
}

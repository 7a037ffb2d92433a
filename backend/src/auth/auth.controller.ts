import type { LoginResponse, UserSummary } from '@kinpath/contracts';
import { Body, Controller, Get, HttpCode, Post } from '@nestjs/common';
import { ApiOkResponse, ApiOperation, ApiTags, ApiUnauthorizedResponse } from '@nestjs/swagger';
import type { User } from '../users/entities/user.entity';
import { toSummary } from '../users/users.service';
import { AuthService } from './auth.service';
import { CurrentUser, Public, SignedIn } from './decorators';
import { LoginDto } from './dto/login.dto';

@ApiTags('auth')
@Controller('auth')
export class AuthController {
  constructor(private readonly auth: AuthService) {}

  @Public()
  @Post('login')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Sign in with e-mail and password; returns a bearer token (15 minutes).',
  })
  @ApiOkResponse({ description: '{ accessToken, user }' })
  @ApiUnauthorizedResponse({ description: 'Wrong e-mail or password (one message for both).' })
  login(@Body() dto: LoginDto): Promise<LoginResponse> {
    return this.auth.signIn(dto.email, dto.password);
  }

  @SignedIn()
  @Get('me')
  @ApiOperation({ summary: 'The signed-in user.' })
  me(@CurrentUser() user: User): UserSummary {
    return toSummary(user);
  }
}

import type {
  LinkCheckResponse,
  LoginResponse,
  PasswordSetResponse,
  UserSummary,
} from '@kinpath/contracts';
import { Body, Controller, Get, HttpCode, Ip, Post, UseGuards } from '@nestjs/common';
import {
  ApiAcceptedResponse,
  ApiBadRequestResponse,
  ApiNoContentResponse,
  ApiOkResponse,
  ApiOperation,
  ApiTags,
  ApiTooManyRequestsResponse,
  ApiUnauthorizedResponse,
} from '@nestjs/swagger';
import { ThrottlerGuard } from '@nestjs/throttler';
import type { User } from '../users/entities/user.entity';
import { InvitationsService } from '../users/invitations.service';
import { PasswordResetService } from '../users/password-reset.service';
import { toSummary } from '../users/users.service';
import { AuthService } from './auth.service';
import { CurrentSession, CurrentUser, Public, SignedIn } from './decorators';
import {
  AcceptInvitationDto,
  CheckLinkDto,
  ConfirmPasswordResetDto,
  RequestPasswordResetDto,
} from './dto/account.dto';
import { LoginDto } from './dto/login.dto';
import type { RequestSession } from './sessions';

@ApiTags('auth')
@Controller('auth')
export class AuthController {
  constructor(
    private readonly auth: AuthService,
    private readonly invitations: InvitationsService,
    private readonly resets: PasswordResetService,
  ) {}

  @Public()
  @Post('login')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Sign in with e-mail and password; returns a bearer token (15 minutes).',
    description:
      'Renew the token with POST /api/auth/refresh while the user is active; a session lasts at most 12 hours. After 5 failed attempts for one account or 20 from one address within 15 minutes, sign-in answers 429 for 15 minutes.',
  })
  @ApiOkResponse({ description: '{ accessToken, user, expiresAt, sessionExpiresAt }' })
  @ApiUnauthorizedResponse({ description: 'Wrong e-mail or password (one message for both).' })
  @ApiTooManyRequestsResponse({
    description: 'Too many failed attempts; the message says how long to wait.',
  })
  login(@Body() dto: LoginDto, @Ip() address: string): Promise<LoginResponse> {
    return this.auth.signIn(dto.email, dto.password, address);
  }

  @SignedIn()
  @Get('me')
  @ApiOperation({ summary: 'The signed-in user.' })
  me(@CurrentUser() user: User): UserSummary {
    return toSummary(user);
  }

  @SignedIn()
  @Post('refresh')
  @HttpCode(200)
  @ApiOperation({
    summary: 'A new access token for the same session (15 minutes, never past the session’s end).',
  })
  refresh(
    @CurrentUser() user: User,
    @CurrentSession() session: RequestSession,
  ): Promise<LoginResponse> {
    return this.auth.renew(user, session);
  }

  @SignedIn()
  @Post('logout')
  @HttpCode(204)
  @ApiOperation({ summary: 'Sign out: ends this session; its tokens stop working at once.' })
  @ApiNoContentResponse({ description: 'Signed out.' })
  logout(@CurrentUser() user: User, @CurrentSession() session: RequestSession): Promise<void> {
    return this.auth.signOut(user, session);
  }

  @Public()
  @UseGuards(ThrottlerGuard)
  @Post('invitations/check')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Check an invitation link without using it, when its page opens.',
    description: 'Answers `{ email }` while the link can set a password; nothing is spent.',
  })
  @ApiBadRequestResponse({ description: 'A link expired, used, revoked or malformed.' })
  checkInvitation(@Body() dto: CheckLinkDto): Promise<LinkCheckResponse> {
    return this.invitations.check(dto.token);
  }

  @Public()
  @UseGuards(ThrottlerGuard)
  @Post('password-reset/check')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Check a password reset link without using it, when its page opens.',
    description: 'Answers `{ email }` while the link can set a password; nothing is spent.',
  })
  @ApiBadRequestResponse({ description: 'A link expired, used, revoked or malformed.' })
  checkPasswordReset(@Body() dto: CheckLinkDto): Promise<LinkCheckResponse> {
    return this.resets.check(dto.token);
  }

  @Public()
  @UseGuards(ThrottlerGuard)
  @Post('invitations/accept')
  @HttpCode(200)
  @ApiOperation({ summary: 'Set the password through an invitation link; activates the account.' })
  @ApiBadRequestResponse({ description: 'A weak password, or a link expired, used or revoked.' })
  acceptInvitation(@Body() dto: AcceptInvitationDto): Promise<PasswordSetResponse> {
    return this.invitations
      .accept(dto.token, dto.password)
      .then(({ email }) => ({ email, message: 'Your password is set. Sign in to continue.' }));
  }

  @Public()
  @UseGuards(ThrottlerGuard)
  @Post('password-reset')
  @HttpCode(202)
  @ApiOperation({
    summary: 'Ask for a password reset link by e-mail.',
    description: 'The answer is the same whether or not an account uses the address.',
  })
  @ApiAcceptedResponse({ description: '{ message }' })
  requestPasswordReset(
    @Body() dto: RequestPasswordResetDto,
    @Ip() address: string,
  ): { message: string } {
    return this.resets.request(dto.email, address);
  }

  @Public()
  @UseGuards(ThrottlerGuard)
  @Post('password-reset/confirm')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Set a new password through a reset link; ends the account’s other sessions.',
  })
  @ApiBadRequestResponse({ description: 'A weak password, or a link expired, used or revoked.' })
  confirmPasswordReset(@Body() dto: ConfirmPasswordResetDto): Promise<PasswordSetResponse> {
    return this.resets
      .confirm(dto.token, dto.password)
      .then(({ email }) => ({ email, message: 'Your new password is set. Sign in to continue.' }));
  }
}

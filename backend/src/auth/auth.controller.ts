import type {
  LinkCheckResponse,
  LoginResponse,
  PasswordSetResponse,
  UserSummary,
} from '@kinpath/contracts';
import { Body, Controller, Get, HttpCode, Ip, Post } from '@nestjs/common';
import {
  ApiAcceptedResponse,
  ApiBadRequestResponse,
  ApiForbiddenResponse,
  ApiNoContentResponse,
  ApiOkResponse,
  ApiOperation,
  ApiTags,
  ApiUnauthorizedResponse,
} from '@nestjs/swagger';
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
import { RateLimit } from './rate-limit';
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
  @RateLimit('signIn')
  @Post('login')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Sign in with e-mail and password; returns a bearer token (15 minutes).',
    description:
      'Renew the token with POST /api/auth/refresh while the user is active; a session lasts at most 12 hours. After 5 failed attempts for one account from one address, or 20 from one address, within 15 minutes, sign-in from that address answers 429 for 15 minutes (for that account, or for all). An account is never paused for everyone: after 5 failures from anywhere, each attempt on it waits first (1 s, doubling, at most 8 s) until its correct password is given.',
  })
  @ApiOkResponse({ description: '{ accessToken, user, expiresAt, sessionExpiresAt }' })
  @ApiUnauthorizedResponse({ description: 'Wrong e-mail or password (one message for both).' })
  @ApiForbiddenResponse({
    description:
      'The correct password of a deactivated account: the message says so and whom to ask.',
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
  @RateLimit('accountLinks')
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
  @RateLimit('accountLinks')
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
  @RateLimit('accountLinks')
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
  @RateLimit('accountLinks')
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
  @RateLimit('accountLinks')
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

import { Module } from '@nestjs/common';
import { APP_GUARD } from '@nestjs/core';
import { JwtModule } from '@nestjs/jwt';
import { PassportModule } from '@nestjs/passport';
import { ThrottlerModule } from '@nestjs/throttler';
import { ApiTokensModule } from '../api-tokens/api-tokens.module';
import { UsersModule } from '../users/users.module';
import { AuthController } from './auth.controller';
import { AuthService } from './auth.service';
import { JwtAuthGuard } from './jwt-auth.guard';
import { JwtSecret } from './jwt-secret';
import { RolesGuard } from './roles.guard';
import { SessionsService } from './sessions.service';
import { SignInThrottleService } from './sign-in-throttle.service';
import { RateLimitGuard, rateLimitMessage } from './rate-limit';
import { JwtStrategy } from './strategies/jwt.strategy';

@Module({
  imports: [
    UsersModule,
    ApiTokensModule,
    PassportModule,
    // The secret is passed on each call from JwtSecret, so the module itself holds none.
    JwtModule.register({}),
    // Route-level request limits (RATE_LIMITS, applied with @RateLimit); each route sets its
    // own, this default is never used alone. Sign-in failures have their own counters.
    ThrottlerModule.forRoot({
      throttlers: [{ ttl: 60_000, limit: 30 }],
      errorMessage: (_context, detail) => rateLimitMessage(detail.timeToBlockExpire),
    }),
  ],
  controllers: [AuthController],
  providers: [
    AuthService,
    JwtSecret,
    JwtStrategy,
    SessionsService,
    SignInThrottleService,
    RateLimitGuard,
    // Order matters: the token guard sets request.user before the roles guard reads it.
    { provide: APP_GUARD, useClass: JwtAuthGuard },
    { provide: APP_GUARD, useClass: RolesGuard },
  ],
  exports: [RateLimitGuard],
})
export class AuthModule {}

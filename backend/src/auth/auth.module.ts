import { Module } from '@nestjs/common';
import { APP_GUARD } from '@nestjs/core';
import { JwtModule } from '@nestjs/jwt';
import { PassportModule } from '@nestjs/passport';
import { ThrottlerModule } from '@nestjs/throttler';
import { UsersModule } from '../users/users.module';
import { AuthController } from './auth.controller';
import { AuthService } from './auth.service';
import { JwtAuthGuard } from './jwt-auth.guard';
import { JwtSecret } from './jwt-secret';
import { RolesGuard } from './roles.guard';
import { SessionsService } from './sessions.service';
import { SignInThrottleService } from './sign-in-throttle.service';
import { JwtStrategy } from './strategies/jwt.strategy';

@Module({
  imports: [
    UsersModule,
    PassportModule,
    // The secret is passed on each call from JwtSecret, so the module itself holds none.
    JwtModule.register({}),
    // Per address, for the public account routes (reset requests send e-mail); sign-in has
    // its own failure counters in SignInThrottleService.
    ThrottlerModule.forRoot({
      throttlers: [{ ttl: 60_000, limit: 30 }],
      errorMessage: 'Too many requests from this address. Wait a minute, then try again.',
    }),
  ],
  controllers: [AuthController],
  providers: [
    AuthService,
    JwtSecret,
    JwtStrategy,
    SessionsService,
    SignInThrottleService,
    // Order matters: the token guard sets request.user before the roles guard reads it.
    { provide: APP_GUARD, useClass: JwtAuthGuard },
    { provide: APP_GUARD, useClass: RolesGuard },
  ],
})
export class AuthModule {}

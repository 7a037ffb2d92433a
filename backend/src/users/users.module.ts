import { Module } from '@nestjs/common';
import { TypeOrmModule } from '@nestjs/typeorm';
import { DepartmentsModule } from '../departments/departments.module';
import { MailModule } from '../mail/mail.module';
import { User } from './entities/user.entity';
import { UsersController } from './users.controller';
import { InvitationsService } from './invitations.service';
import { PasswordResetService } from './password-reset.service';
import { UsersService } from './users.service';

@Module({
  imports: [TypeOrmModule.forFeature([User]), MailModule, DepartmentsModule],
  controllers: [UsersController],
  providers: [UsersService, InvitationsService, PasswordResetService],
  exports: [UsersService, InvitationsService, PasswordResetService],
})
export class UsersModule {}

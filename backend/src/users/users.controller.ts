import type { CreateUserResponse, UserAccount } from '@kinpath/contracts';
import {
  Body,
  Controller,
  Delete,
  Get,
  HttpCode,
  NotFoundException,
  Param,
  ParseUUIDPipe,
  Patch,
  Post,
} from '@nestjs/common';
import {
  ApiBadRequestResponse,
  ApiConflictResponse,
  ApiNoContentResponse,
  ApiOperation,
  ApiTags,
} from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import { CreateUserDto } from './dto/create-user.dto';
import { UpdateUserDto } from './dto/update-user.dto';
import type { User } from './entities/user.entity';
import { InvitationsService } from './invitations.service';
import { UsersService } from './users.service';

const userIdPipe = new ParseUUIDPipe({
  exceptionFactory: () => new NotFoundException('No account has this id.'),
});

@ApiTags('users')
@SignedIn()
@Roles('admin')
@Controller('users')
export class UsersController {
  constructor(
    private readonly users: UsersService,
    private readonly invitations: InvitationsService,
  ) {}

  @Get()
  @ApiOperation({ summary: 'List every account.' })
  list(): Promise<UserAccount[]> {
    return this.users.list();
  }

  @Post()
  @ApiOperation({
    summary: 'Create an account.',
    description:
      'With a password (at least 12 characters, not a common one) the account is ready at once; without one it is created inactive and an invitation e-mail with a single-use link (72 hours) goes out.',
  })
  @ApiBadRequestResponse({
    description: 'Invalid fields, a short password, or a head without department.',
  })
  @ApiConflictResponse({ description: 'An account with this e-mail exists already.' })
  create(@CurrentUser() actor: User, @Body() dto: CreateUserDto): Promise<CreateUserResponse> {
    return this.users.create(actor, dto);
  }

  @Patch(':id')
  @ApiOperation({
    summary: 'Change role, department, display name or active state.',
    description:
      'A role change applies from the next request; deactivation ends every session at once.',
  })
  @ApiConflictResponse({ description: 'The change would leave no active admin.' })
  update(
    @CurrentUser() actor: User,
    @Param('id', userIdPipe) id: string,
    @Body() dto: UpdateUserDto,
  ): Promise<UserAccount> {
    return this.users.update(actor, id, dto);
  }

  @Post(':id/invitation')
  @HttpCode(202)
  @ApiOperation({ summary: 'Send the invitation again: a new link replaces the older ones.' })
  @ApiConflictResponse({ description: 'The account has accepted its invitation already.' })
  resendInvitation(
    @CurrentUser() actor: User,
    @Param('id', userIdPipe) id: string,
  ): Promise<{ expiresAt: string }> {
    return this.invitations.send(actor, id);
  }

  @Delete(':id/invitation')
  @HttpCode(204)
  @ApiOperation({ summary: 'Revoke the invitation: its link stops working.' })
  @ApiNoContentResponse({ description: 'Revoked; the account stays inactive.' })
  @ApiConflictResponse({ description: 'The account has accepted its invitation already.' })
  revokeInvitation(@CurrentUser() actor: User, @Param('id', userIdPipe) id: string): Promise<void> {
    return this.invitations.revoke(actor, id);
  }
}

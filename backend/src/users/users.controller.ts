import type { CreateUserResponse, UserAccount } from '@kinpath/contracts';
import {
  Body,
  Controller,
  Get,
  NotFoundException,
  Param,
  ParseUUIDPipe,
  Patch,
  Post,
} from '@nestjs/common';
import { ApiBadRequestResponse, ApiConflictResponse, ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import { CreateUserDto } from './dto/create-user.dto';
import { UpdateUserDto } from './dto/update-user.dto';
import type { User } from './entities/user.entity';
import { UsersService } from './users.service';

@ApiTags('users')
@SignedIn()
@Roles('admin')
@Controller('users')
export class UsersController {
  constructor(private readonly users: UsersService) {}

  @Get()
  @ApiOperation({ summary: 'List every account.' })
  list(): Promise<UserAccount[]> {
    return this.users.list();
  }

  @Post()
  @ApiOperation({
    summary: 'Create an account.',
    description:
      'With a password (at least 12 characters) the account is ready at once; without one it is created inactive, waiting for an invitation.',
  })
  @ApiBadRequestResponse({
    description: 'Invalid fields, a short password, or a head without department.',
  })
  @ApiConflictResponse({ description: 'An account with this e-mail exists already.' })
  create(@CurrentUser() actor: User, @Body() dto: CreateUserDto): Promise<CreateUserResponse> {
    return this.users.create(actor, dto);
  }

  @Patch(':id')
  @ApiOperation({ summary: 'Change role, department, display name or active state.' })
  @ApiConflictResponse({ description: 'The change would leave no active admin.' })
  update(
    @CurrentUser() actor: User,
    @Param(
      'id',
      new ParseUUIDPipe({
        exceptionFactory: () => new NotFoundException('No account has this id.'),
      }),
    )
    id: string,
    @Body() dto: UpdateUserDto,
  ): Promise<UserAccount> {
    return this.users.update(actor, id, dto);
  }
}

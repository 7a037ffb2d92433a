import type { DepartmentEntry } from '@kinpath/contracts';
import { Body, Controller, Delete, Get, HttpCode, Param, Post } from '@nestjs/common';
import { ApiConflictResponse, ApiNoContentResponse, ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { DepartmentsService } from './departments.service';
import { AddDepartmentDto } from './dto/add-department.dto';

@ApiTags('departments')
@SignedIn()
@Controller('departments')
export class DepartmentsController {
  constructor(private readonly departments: DepartmentsService) {}

  @Get()
  @ApiOperation({
    summary: 'Departments a head may be scoped to: the catalogue’s and those admins added.',
  })
  list(): Promise<DepartmentEntry[]> {
    return this.departments.list();
  }

  @Post()
  @Roles('admin')
  @ApiOperation({ summary: 'Add a department the catalogue does not list yet (admin).' })
  @ApiConflictResponse({ description: 'The code is on the list already.' })
  add(@CurrentUser() actor: User, @Body() dto: AddDepartmentDto): Promise<DepartmentEntry> {
    return this.departments.add(actor, dto);
  }

  @Delete(':code')
  @Roles('admin')
  @HttpCode(204)
  @ApiOperation({ summary: 'Remove an added department no course and no head uses (admin).' })
  @ApiNoContentResponse({ description: 'Removed.' })
  @ApiConflictResponse({ description: 'Still used by courses or heads.' })
  async remove(@CurrentUser() actor: User, @Param('code') code: string): Promise<void> {
    await this.departments.remove(actor, code.toUpperCase());
  }
}

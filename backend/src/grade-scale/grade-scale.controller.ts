import type { GradeScale, UpdateGradeScaleResponse } from '@kinpath/contracts';
import { Body, Controller, Get, Put } from '@nestjs/common';
import { ApiOperation, ApiTags } from '@nestjs/swagger';
import { CurrentUser, Roles, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { UpdateGradeScaleDto } from './dto/update-grade-scale.dto';
import { GradeScaleService } from './grade-scale.service';

@ApiTags('grade scale')
@SignedIn()
@Controller('grade-scale')
export class GradeScaleController {
  constructor(private readonly scale: GradeScaleService) {}

  @Get()
  get(): Promise<GradeScale> {
    return this.scale.get();
  }

  @Put()
  @Roles('registrar')
  @ApiOperation({ summary: 'Replace the scale; stored records get their grade points re-derived.' })
  update(
    @Body() body: UpdateGradeScaleDto,
    @CurrentUser() user: User,
  ): Promise<UpdateGradeScaleResponse> {
    return this.scale.update(body, user);
  }
}

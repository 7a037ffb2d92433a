import { Module } from '@nestjs/common';
import { TypeOrmModule } from '@nestjs/typeorm';
import { User } from '../users/entities/user.entity';
import { ApiTokensController } from './api-tokens.controller';
import { ApiTokensRepository } from './api-tokens.repository';
import { ApiTokensService } from './api-tokens.service';
import { ApiToken } from './entities/api-token.entity';

@Module({
  imports: [TypeOrmModule.forFeature([ApiToken, User])],
  controllers: [ApiTokensController],
  providers: [ApiTokensService, ApiTokensRepository],
  exports: [ApiTokensService],
})
export class ApiTokensModule {}

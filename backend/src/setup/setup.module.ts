import { Module } from '@nestjs/common';
import { DemoModule } from '../demo/demo.module';
import { UsersModule } from '../users/users.module';
import { SetupService } from './setup.service';

@Module({
  imports: [UsersModule, DemoModule],
  providers: [SetupService],
  exports: [SetupService],
})
export class SetupModule {}

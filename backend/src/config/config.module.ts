import { Global, Module } from '@nestjs/common';
import { APP_CONFIG, appConfigProvider } from './config.provider';

@Global()
@Module({
  providers: [appConfigProvider],
  exports: [APP_CONFIG],
})
export class ConfigModule {}

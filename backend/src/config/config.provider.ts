import { Inject, Provider } from '@nestjs/common';
import { AppConfig, loadConfig } from './config';

export const APP_CONFIG = Symbol('APP_CONFIG');

/** Injects the validated settings: `constructor(@InjectConfig() config: AppConfig)`. */
export const InjectConfig = (): ParameterDecorator => Inject(APP_CONFIG);

export const appConfigProvider: Provider = {
  provide: APP_CONFIG,
  useFactory: (): AppConfig => loadConfig(),
};

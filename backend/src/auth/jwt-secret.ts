import { Injectable } from '@nestjs/common';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { readOrCreateSecret } from '../config/secrets';

export const JWT_ALGORITHM = 'HS256';
export { ACCESS_TOKEN_TTL_SECONDS } from './sessions';

/** The signing secret: KINPATH_JWT_SECRET, or one generated once into the data folder. */
@Injectable()
export class JwtSecret {
  readonly value: string;

  constructor(@InjectConfig() config: AppConfig) {
    this.value = config.jwtSecret ?? readOrCreateSecret(config.dataDir, 'jwt-secret');
  }
}

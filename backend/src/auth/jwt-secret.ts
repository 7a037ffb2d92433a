import { Injectable } from '@nestjs/common';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { readOrCreateSecret } from '../config/secrets';

export const JWT_ALGORITHM = 'HS256';
/** Access tokens are short-lived; issue 8 adds renewal while the user is active. */
export const ACCESS_TOKEN_TTL_SECONDS = 15 * 60;

/** The signing secret: KINPATH_JWT_SECRET, or one generated once into the data folder. */
@Injectable()
export class JwtSecret {
  readonly value: string;

  constructor(@InjectConfig() config: AppConfig) {
    this.value = config.jwtSecret ?? readOrCreateSecret(config.dataDir, 'jwt-secret');
  }
}

import { Injectable } from '@nestjs/common';
import { createSecretKey, type KeyObject } from 'node:crypto';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { readOrCreateSecret } from '../config/secrets';

export const JWT_ALGORITHM = 'HS256';
export { ACCESS_TOKEN_TTL_SECONDS } from './sessions';

/** The signing secret: KINPATH_JWT_SECRET, or one generated once into the data folder. */
@Injectable()
export class JwtSecret {
  /** For signing (once per sign-in or renewal). */
  readonly value: string;
  /** For verifying on every request: a key object, which the JWT library would otherwise rebuild each time. */
  readonly verificationKey: KeyObject;

  constructor(@InjectConfig() config: AppConfig) {
    this.value = config.jwtSecret ?? readOrCreateSecret(config.dataDir, 'jwt-secret');
    this.verificationKey = createSecretKey(Buffer.from(this.value, 'utf8'));
  }
}

import { Injectable, Logger } from '@nestjs/common';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { readOrCreateSecret } from '../config/secrets';
import { hmacSha256Hex, pseudonymFor } from './pseudonym';

export const DEMO_PSEUDONYM_KEY_FILE = 'pseudonym-key.demo';

/**
 * The single place that turns a student number into a pseudonym (data.md,
 * privacy by design). Callers keep the raw number no longer than the call.
 */
@Injectable()
export class PseudonymService {
  private readonly logger = new Logger(PseudonymService.name);
  private readonly key: string;
  readonly usingDemoKey: boolean;

  constructor(@InjectConfig() config: AppConfig) {
    this.usingDemoKey = config.pseudonymKey === undefined;
    this.key = config.pseudonymKey ?? readOrCreateSecret(config.dataDir, DEMO_PSEUDONYM_KEY_FILE);
    if (this.usingDemoKey) {
      this.logger.warn(
        "KINPATH_PSEUDONYM_KEY is not set: student numbers are pseudonymised with the demo key of the data folder. Set your institution's key before importing real records.",
      );
    }
  }

  pseudonymFor(studentId: string): string {
    return pseudonymFor(this.key, studentId);
  }

  /**
   * The keyed digest that recognises an import file again: HMAC-SHA256 of the
   * file's SHA-256 under the same key, so a small file cannot be found by guessing.
   */
  fileDigest(sha256Hex: string): string {
    return hmacSha256Hex(this.key, `import-file:${sha256Hex}`);
  }
}

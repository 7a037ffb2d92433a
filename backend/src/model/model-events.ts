import type { ModelSettingsVersion } from '@kinpath/contracts';
import { Injectable } from '@nestjs/common';
import { Subject } from 'rxjs';

/** Published once a rebuilt model answers requests. */
export interface ModelRefreshed {
  builtAt: Date;
  /** Imports whose term data this model is the first to include. */
  importIds: string[];
  students: number;
  records: number;
  buildMs: number;
}

/**
 * What other features (imports history, demand outlook) may follow: a model
 * rebuilt from new term data, and a new version of the model settings.
 */
@Injectable()
export class ModelEvents {
  private readonly refreshed = new Subject<ModelRefreshed>();
  private readonly settings = new Subject<ModelSettingsVersion>();
  readonly modelRefreshed$ = this.refreshed.asObservable();
  readonly settingsChanged$ = this.settings.asObservable();

  publishRefreshed(event: ModelRefreshed): void {
    this.refreshed.next(event);
  }

  publishSettings(version: ModelSettingsVersion): void {
    this.settings.next(version);
  }
}

import { Injectable } from '@nestjs/common';
import { Subject } from 'rxjs';

/** Published after an import's commit or rollback has been written for good. */
export interface TermDataChanged {
  importId: string;
  kind: string;
  action: 'commit' | 'rollback';
  at: Date;
}

/**
 * The hook for whatever keeps derived state of the term data (the advising
 * model): subscribe to `changed`, rebuild, then call
 * `ImportsService.markModelRefreshed(importId, at)` so the history shows it.
 */
@Injectable()
export class TermDataEvents {
  private readonly subject = new Subject<TermDataChanged>();
  readonly changed = this.subject.asObservable();

  publish(event: TermDataChanged): void {
    this.subject.next(event);
  }
}

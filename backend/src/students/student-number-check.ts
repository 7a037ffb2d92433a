import { Injectable } from '@nestjs/common';
import { InjectDataSource } from '@nestjs/typeorm';
import type { DataSource } from 'typeorm';
import { studentNumberLikeWords, type AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { PseudonymService } from '../pseudonym/pseudonym.service';

/**
 * Finds student numbers in free text (notes, summary messages) before it is stored or
 * sent. Words of the configured form are compared by pseudonym with the students on
 * record, so years and course numbers that merely look alike pass.
 */
@Injectable()
export class StudentNumberCheck {
  constructor(
    @InjectDataSource() private readonly dataSource: DataSource,
    private readonly pseudonyms: PseudonymService,
    @InjectConfig() private readonly config: AppConfig,
  ) {}

  async mentionsStudent(text: string): Promise<boolean> {
    const words = studentNumberLikeWords(text, this.config.studentNumberPattern).slice(0, 100);
    if (words.length === 0) return false;
    const pseudonyms = words.map((w) => this.pseudonyms.pseudonymFor(w));
    const rows: unknown[] = await this.dataSource.query(
      `SELECT 1 FROM students WHERE pseudonym = ANY($1::text[]) LIMIT 1`,
      [pseudonyms],
    );
    return rows.length > 0;
  }
}

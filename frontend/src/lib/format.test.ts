import { describe, expect, it } from 'vitest';
import { dateTime, isoDate, satisfactionText } from './format';

describe('one format for figures and dates', () => {
  it('rounds satisfaction to two decimals, as the summary e-mail does', () => {
    expect(satisfactionText(3.2667)).toBe('3.27');
    expect(satisfactionText(4)).toBe('4.00');
  });

  it('writes dates in the ISO form, in the reader’s clock', () => {
    const local = new Date(2026, 2, 4, 9, 5);
    expect(isoDate(local.toISOString())).toBe('2026-03-04');
    expect(dateTime(local.toISOString())).toBe('2026-03-04 09:05');
    expect(dateTime(null)).toBe('—');
  });
});

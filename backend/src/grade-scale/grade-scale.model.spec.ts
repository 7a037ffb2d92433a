import { DEFAULT_GRADE_SCALE } from '@kinpath/contracts';
import { describe, expect, it } from 'vitest';
import { DEFAULT_SCALE_MODEL, GradeScaleModel } from './grade-scale.model';

describe('grade mapping', () => {
  it('reads letters and marks in any case, in their stored form', () => {
    expect(DEFAULT_SCALE_MODEL.read('a-')).toEqual({ grade: 'A-', points: 3.7 });
    expect(DEFAULT_SCALE_MODEL.read(' B+ ')).toEqual({ grade: 'B+', points: 3.3 });
    expect(DEFAULT_SCALE_MODEL.read('ip')).toEqual({ grade: 'IP', points: null });
    expect(DEFAULT_SCALE_MODEL.read('W')).toEqual({ grade: 'W', points: null });
  });

  it('takes a number within the scale range as grade points, and refuses one outside', () => {
    expect(DEFAULT_SCALE_MODEL.read('3.25')).toEqual({ grade: '3.25', points: 3.25 });
    expect(DEFAULT_SCALE_MODEL.read('0')).toEqual({ grade: '0', points: 0 });
    expect(DEFAULT_SCALE_MODEL.read('4.5')).toBeNull();
    expect(DEFAULT_SCALE_MODEL.read('-1')).toBeNull();
    expect(DEFAULT_SCALE_MODEL.read('Q')).toBeNull();
  });

  it('describes an unknown grade with the scale and the marks', () => {
    expect(DEFAULT_SCALE_MODEL.describeUnknown('Q')).toBe(
      "'Q' is not on the grade scale (A … F) nor a mark (W, I, IP, AU, P, NP), nor grade points from 0 to 4",
    );
  });

  it('finds the passing threshold (D- by default) and the range of an edited scale', () => {
    expect(DEFAULT_SCALE_MODEL.passingThreshold()).toBe('D-');
    const edited = new GradeScaleModel([
      { letter: 'A+', points: 4.3, passing: true },
      ...DEFAULT_GRADE_SCALE.map((e) =>
        e.points !== null ? { ...e, passing: e.points >= 1.7 } : e,
      ),
    ]);
    expect(edited.passingThreshold()).toBe('C-');
    expect(edited.toApi()).toMatchObject({ minPoints: 0, maxPoints: 4.3, passingThreshold: 'C-' });
    expect(edited.read('4.2')).toEqual({ grade: '4.2', points: 4.2 });
  });
});

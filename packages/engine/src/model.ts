import {
  BuildOptions,
  Damping,
  RecordsInput,
  Scale,
  Settings,
  Signal,
  SIGNALS,
  ValueColumn,
} from './types';

/** Damping of the baseline means (method.md). */
export const BASELINE_DAMPING = 5;

/** A record the engine refuses, named by its index in the input arrays. */
export class RecordError extends Error {
  constructor(
    readonly index: number,
    readonly student: string,
    readonly course: string,
    readonly reason: string,
  ) {
    super(
      `record ${index} (student ${JSON.stringify(student)}, course ${JSON.stringify(course)}): ${reason}`,
    );
    this.name = 'RecordError';
  }
}

// Typed arrays live on SharedArrayBuffer so batch workers read the model without copying it.
export function sharedI32(n: number): Int32Array {
  return new Int32Array(new SharedArrayBuffer(Math.max(1, n) * 4)).subarray(0, n);
}
export function sharedF64(n: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(Math.max(1, n) * 8)).subarray(0, n);
}

/** Validated, indexed records: the input of every model build (whole data or a training subset). */
export interface RecordTable {
  studentKeys: string[];
  courseKeys: string[];
  termKeys: string[]; // in term order
  student: Int32Array;
  course: Int32Array;
  term: Int32Array; // rank in termKeys
  values: Record<Signal, Float64Array>; // NaN = no value
  scales: Partial<Record<Signal, Scale>>;
}

/** One signal's values, compressed by student and by course. */
export interface SignalData {
  rowPtr: Int32Array; // students + 1
  rowCourse: Int32Array; // ascending within a row
  rowValue: Float64Array;
  colPtr: Int32Array; // courses + 1
  colStudent: Int32Array; // ascending within a column
  colValue: Float64Array;
  /** m_u; the global mean for a student with no value. */
  mean: Float64Array;
  globalMean: number; // NaN when the signal has no value at all
  courseMean: Float64Array; // NaN for a course with no value
  courseBias: Float64Array; // damped b_j
  studentBias: Float64Array; // damped b_u
  /**
   * Added to the centre m_u of a student to give the centre of a cell: b_j under baseline
   * centring (then mean holds mu + b_u), zeros otherwise.
   */
  courseShift: Float64Array;
  /** Students with at least one value (N of the inverse user frequency). */
  active: number;
  // Derived arrays for similarity, computed on first use (see similarityView). Present from
  // the start (as null) so every SignalData has one shape for the optimiser.
  rowCentered: Float64Array | null;
  colCentered: Float64Array | null;
  iuf: Float64Array | null;
  norms: Partial<Record<string, Float64Array>>;
  dense: Partial<Record<string, DenseBlock>>;
}

/**
 * Courses that most students have, stored student-major (x of student i in dense course g at
 * i * width + g, 0 when i has no value), so their similarity terms are added in one sequential
 * pass over all students instead of a scatter per course.
 */
export interface DenseBlock {
  /** Dense position of each course, -1 for a course kept sparse. */
  slot: Int32Array;
  width: number;
  x: Float64Array;
}

/** A course is dense when at least this share of students has a value in it. */
export const DENSE_SHARE = 0.25;

export interface Model {
  studentKeys: string[];
  courseKeys: string[];
  studentIndex: Map<string, number>;
  courseIndex: Map<string, number>;
  /** Rank of each student key in string order: the tie rule of the neighbourhood. */
  studentRank: Int32Array;
  signals: Record<Signal, SignalData>;
  /** Every course with any record (W included), value 1: the enrolment similarity's data. */
  enrolment: SignalData;
  /**
   * Centring and damping this model's centres and baselines were made for (see modelFor);
   * null for a model as built (student means, damping 5).
   */
  variant: string | null;
  /** Both signals' courses per student in one row, made on first use (see unionRows). */
  union: UnionRows | null;
  scales: Partial<Record<Signal, Scale>>;
}

function readValue(
  col: ValueColumn | undefined,
  r: number,
  signal: Signal,
  scale: Scale | undefined,
  student: string,
  course: string,
): number {
  if (!col) return NaN;
  const v = col[r];
  if (v === null || v === undefined) return NaN;
  if (typeof v !== 'number') {
    throw new RecordError(r, student, course, `${signal} ${JSON.stringify(v)} is not a number`);
  }
  if (Number.isNaN(v)) return NaN;
  if (!Number.isFinite(v))
    throw new RecordError(r, student, course, `${signal} ${v} is not finite`);
  if (scale && (v < scale.min || v > scale.max)) {
    throw new RecordError(
      r,
      student,
      course,
      `${signal} ${v} is outside the scale ${scale.min}..${scale.max}`,
    );
  }
  return v;
}

function keyAt(
  arr: ArrayLike<string>,
  r: number,
  what: string,
  student: string,
  course: string,
): string {
  const k = arr[r];
  if (typeof k !== 'string' || k.length === 0) {
    throw new RecordError(r, student, course, `empty ${what} key`);
  }
  return k;
}

/** Validate and index the input arrays. Throws RecordError on the first bad record. */
export function buildTable(input: RecordsInput, options: BuildOptions = {}): RecordTable {
  const n = input.students.length;
  for (const [name, col] of [
    ['courses', input.courses],
    ['terms', input.terms],
    ['grades', input.grades],
    ['satisfaction', input.satisfaction],
  ] as const) {
    if (col && col.length !== n) {
      throw new Error(`records input: ${name} has ${col.length} entries, students has ${n}`);
    }
  }
  const scales = options.scales ?? {};
  for (const s of SIGNALS) {
    const sc = scales[s];
    if (sc && !(Number.isFinite(sc.min) && Number.isFinite(sc.max) && sc.min < sc.max)) {
      throw new Error(`${s} scale ${sc.min}..${sc.max} is not a range`);
    }
  }
  const studentIndex = new Map<string, number>();
  const courseIndex = new Map<string, number>();
  const termIndex = new Map<string, number>();
  const studentKeys: string[] = [];
  const courseKeys: string[] = [];
  const termKeysRaw: string[] = [];
  const student = new Int32Array(n);
  const course = new Int32Array(n);
  const termRaw = new Int32Array(n);
  const grade = new Float64Array(n);
  const sat = new Float64Array(n);
  for (let r = 0; r < n; r++) {
    const sk = input.students[r];
    const ck = input.courses[r];
    const sName = typeof sk === 'string' ? sk : String(sk);
    const cName = typeof ck === 'string' ? ck : String(ck);
    const s = keyAt(input.students, r, 'student', sName, cName);
    const c = keyAt(input.courses, r, 'course', sName, cName);
    const t = keyAt(input.terms, r, 'term', sName, cName);
    let si = studentIndex.get(s);
    if (si === undefined) {
      si = studentKeys.length;
      studentIndex.set(s, si);
      studentKeys.push(s);
    }
    let ci = courseIndex.get(c);
    if (ci === undefined) {
      ci = courseKeys.length;
      courseIndex.set(c, ci);
      courseKeys.push(c);
    }
    let ti = termIndex.get(t);
    if (ti === undefined) {
      ti = termKeysRaw.length;
      termIndex.set(t, ti);
      termKeysRaw.push(t);
    }
    student[r] = si;
    course[r] = ci;
    termRaw[r] = ti;
    grade[r] = readValue(input.grades, r, 'grade', scales.grade, s, c);
    sat[r] = readValue(input.satisfaction, r, 'satisfaction', scales.satisfaction, s, c);
  }
  const cmp = options.compareTerms ?? ((a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0));
  const order = termKeysRaw.map((_, i) => i).sort((a, b) => cmp(termKeysRaw[a], termKeysRaw[b]));
  const rankOf = new Int32Array(order.length);
  // Terms that compare equal share a rank.
  let rank = -1;
  for (let p = 0; p < order.length; p++) {
    if (p === 0 || cmp(termKeysRaw[order[p - 1]], termKeysRaw[order[p]]) !== 0) rank++;
    rankOf[order[p]] = rank;
  }
  const termKeys = order.map((i) => termKeysRaw[i]);
  const term = new Int32Array(n);
  for (let r = 0; r < n; r++) term[r] = rankOf[termRaw[r]];
  return {
    studentKeys,
    courseKeys,
    termKeys,
    student,
    course,
    term,
    values: { grade, satisfaction: sat },
    scales,
  };
}

/** Stable counting sort of `idx` by key(idx) in [0, buckets). */
function countingSort(idx: Int32Array, key: Int32Array, buckets: number): Int32Array {
  const count = new Int32Array(buckets + 1);
  for (let p = 0; p < idx.length; p++) count[key[idx[p]] + 1]++;
  for (let b = 0; b < buckets; b++) count[b + 1] += count[b];
  const out = new Int32Array(idx.length);
  for (let p = 0; p < idx.length; p++) out[count[key[idx[p]]]++] = idx[p];
  return out;
}

function buildSignal(table: RecordTable, vals: Float64Array, mask: Uint8Array | null): SignalData {
  const S = table.studentKeys.length;
  const C = table.courseKeys.length;
  let m = 0;
  for (let r = 0; r < vals.length; r++) if (vals[r] === vals[r] && (!mask || mask[r])) m++;
  const idx = new Int32Array(m);
  m = 0;
  for (let r = 0; r < vals.length; r++) if (vals[r] === vals[r] && (!mask || mask[r])) idx[m++] = r;
  // By student, then course, then input order: the last of a run with the greatest term wins.
  const byStudent = countingSort(countingSort(idx, table.course, C), table.student, S);
  const rowPtr = sharedI32(S + 1);
  let nnz = 0;
  for (let p = 0; p < byStudent.length; p++) {
    const r = byStudent[p];
    const q = p + 1 < byStudent.length ? byStudent[p + 1] : -1;
    if (q < 0 || table.student[q] !== table.student[r] || table.course[q] !== table.course[r])
      nnz++;
  }
  const rowCourse = sharedI32(nnz);
  const rowValue = sharedF64(nnz);
  let e = 0;
  let best = -1;
  for (let p = 0; p < byStudent.length; p++) {
    const r = byStudent[p];
    if (best < 0 || table.term[r] >= table.term[best]) best = r;
    const q = p + 1 < byStudent.length ? byStudent[p + 1] : -1;
    if (q < 0 || table.student[q] !== table.student[r] || table.course[q] !== table.course[r]) {
      rowCourse[e] = table.course[best];
      rowValue[e] = vals[best];
      rowPtr[table.student[best] + 1]++;
      e++;
      best = -1;
    }
  }
  for (let s = 0; s < S; s++) rowPtr[s + 1] += rowPtr[s];
  // Transpose: students ascend within each course column.
  const colPtr = sharedI32(C + 1);
  for (let p = 0; p < nnz; p++) colPtr[rowCourse[p] + 1]++;
  for (let c = 0; c < C; c++) colPtr[c + 1] += colPtr[c];
  const fill = colPtr.slice(0, C);
  const colStudent = sharedI32(nnz);
  const colValue = sharedF64(nnz);
  for (let s = 0; s < S; s++) {
    for (let p = rowPtr[s]; p < rowPtr[s + 1]; p++) {
      const q = fill[rowCourse[p]]++;
      colStudent[q] = s;
      colValue[q] = rowValue[p];
    }
  }
  // Means and the damped baseline.
  let total = 0;
  for (let p = 0; p < nnz; p++) total += rowValue[p];
  const globalMean = nnz > 0 ? total / nnz : NaN;
  const mean = sharedF64(S);
  let active = 0;
  for (let s = 0; s < S; s++) {
    const a = rowPtr[s];
    const b = rowPtr[s + 1];
    if (b > a) {
      let sum = 0;
      for (let p = a; p < b; p++) sum += rowValue[p];
      mean[s] = sum / (b - a);
      active++;
    } else mean[s] = globalMean;
  }
  const courseMean = sharedF64(C);
  for (let c = 0; c < C; c++) {
    const a = colPtr[c];
    const b = colPtr[c + 1];
    let sum = 0;
    for (let p = a; p < b; p++) sum += colValue[p];
    courseMean[c] = b > a ? sum / (b - a) : NaN;
  }
  const { courseBias, studentBias } = dampedBiases(
    { rowPtr, rowCourse, rowValue, colPtr, colValue, globalMean },
    { student: BASELINE_DAMPING, course: BASELINE_DAMPING },
  );
  return {
    rowPtr,
    rowCourse,
    rowValue,
    colPtr,
    colStudent,
    colValue,
    mean,
    globalMean,
    courseMean,
    courseBias,
    studentBias,
    courseShift: sharedF64(C),
    active,
    rowCentered: null,
    colCentered: null,
    iuf: null,
    norms: {},
    dense: {},
  };
}

/**
 * Damped biases (method.md, "Baseline"): b_j = sum (r - mu) / (n_j + lambda_j),
 * b_u = sum (r - mu - b_j) / (|I_u| + lambda_u); 0 without values.
 */
export function dampedBiases(
  d: Pick<SignalData, 'rowPtr' | 'rowCourse' | 'rowValue' | 'colPtr' | 'colValue' | 'globalMean'>,
  damping: Damping,
): { courseBias: Float64Array; studentBias: Float64Array } {
  const { rowPtr, rowCourse, rowValue, colPtr, colValue, globalMean } = d;
  const C = colPtr.length - 1;
  const S = rowPtr.length - 1;
  const courseBias = sharedF64(C);
  for (let c = 0; c < C; c++) {
    const a = colPtr[c];
    const b = colPtr[c + 1];
    let dev = 0;
    for (let p = a; p < b; p++) dev += colValue[p] - globalMean;
    courseBias[c] = b > a ? dev / (b - a + damping.course) : 0;
  }
  const studentBias = sharedF64(S);
  for (let s = 0; s < S; s++) {
    const a = rowPtr[s];
    const b = rowPtr[s + 1];
    let dev = 0;
    for (let p = a; p < b; p++) dev += rowValue[p] - globalMean - courseBias[rowCourse[p]];
    studentBias[s] = b > a ? dev / (b - a + damping.student) : 0;
  }
  return { courseBias, studentBias };
}

/** Rank of every student key in string (UTF-16 code unit) order. */
function keyRanks(keys: string[]): Int32Array {
  const order = keys
    .map((_, i) => i)
    .sort((a, b) => (keys[a] < keys[b] ? -1 : keys[a] > keys[b] ? 1 : 0));
  const rank = sharedI32(keys.length);
  for (let p = 0; p < order.length; p++) rank[order[p]] = p;
  return rank;
}

/** Build a model from a table, optionally from the records where mask[r] is 1 (a training set). */
export function modelFromTable(table: RecordTable, mask: Uint8Array | null = null): Model {
  const studentIndex = new Map<string, number>();
  table.studentKeys.forEach((k, i) => studentIndex.set(k, i));
  const courseIndex = new Map<string, number>();
  table.courseKeys.forEach((k, i) => courseIndex.set(k, i));
  return {
    studentKeys: table.studentKeys,
    courseKeys: table.courseKeys,
    studentIndex,
    courseIndex,
    studentRank: keyRanks(table.studentKeys),
    signals: {
      grade: buildSignal(table, table.values.grade, mask),
      satisfaction: buildSignal(table, table.values.satisfaction, mask),
    },
    enrolment: buildSignal(table, new Float64Array(table.student.length).fill(1), mask),
    variant: null,
    scales: table.scales,
    union: null,
  };
}

/** The variant key of settings: null when the model as built serves them. */
export function variantKey(settings: Settings): string | null {
  const d = settings.damping;
  const plain =
    settings.centring !== 'baseline' &&
    d.grade.student === BASELINE_DAMPING &&
    d.grade.course === BASELINE_DAMPING &&
    d.satisfaction.student === BASELINE_DAMPING &&
    d.satisfaction.course === BASELINE_DAMPING;
  if (plain) return null;
  return [
    settings.centring === 'baseline' ? 'b' : 'm',
    d.grade.student,
    d.grade.course,
    d.satisfaction.student,
    d.satisfaction.course,
  ].join(',');
}

const variants = new WeakMap<Model, Map<string, Model>>();

/**
 * The model whose centres and baselines match the settings' centring and damping. It shares
 * the built model's records; under baseline centring each student's centre is mu + b_u and
 * each cell's is mu + b_u + b_j, so the residuals e_uj = r_uj - b_uj serve both similarity
 * and prediction. Made once per model and key.
 */
export function modelFor(model: Model, settings: Settings): Model {
  const key = variantKey(settings);
  if (key === model.variant) return model;
  if (model.variant !== null) {
    throw new Error(`this model was prepared for other settings (${model.variant})`);
  }
  if (key === null) return model;
  let byKey = variants.get(model);
  if (!byKey) {
    byKey = new Map();
    variants.set(model, byKey);
  }
  let m = byKey.get(key);
  if (!m) {
    m = {
      ...model,
      signals: {
        grade: variantSignal(model.signals.grade, settings.damping.grade, settings.centring),
        satisfaction: variantSignal(
          model.signals.satisfaction,
          settings.damping.satisfaction,
          settings.centring,
        ),
      },
      variant: key,
      union: null,
    };
    if (model.union && model.union.ok) {
      const S = model.studentKeys.length;
      const means = sharedF64(2 * S);
      for (let u = 0; u < S; u++) {
        means[2 * u] = m.signals.grade.mean[u];
        means[2 * u + 1] = m.signals.satisfaction.mean[u];
      }
      m.union = { ...model.union, means };
    }
    byKey.set(key, m);
  }
  return m;
}

function variantSignal(
  d: SignalData,
  damping: Damping,
  centring: Settings['centring'],
): SignalData {
  const { courseBias, studentBias } = dampedBiases(d, damping);
  if (centring !== 'baseline') {
    return { ...d, courseBias, studentBias };
  }
  const S = d.rowPtr.length - 1;
  const mean = sharedF64(S);
  for (let u = 0; u < S; u++) mean[u] = d.globalMean + studentBias[u];
  return {
    ...d,
    mean,
    courseBias,
    studentBias,
    courseShift: courseBias,
    rowCentered: null,
    colCentered: null,
    norms: {},
    dense: {},
  };
}

/**
 * Build the model from records: validates every record (throws RecordError naming the first
 * bad one), keeps per signal the most recent attempt that carries a value (ties: the later
 * record), and compresses by student and by course. Refresh by building anew.
 */
export function buildModel(input: RecordsInput, options: BuildOptions = {}): Model {
  return modelFromTable(buildTable(input, options));
}

/** The arrays the similarity needs for given settings; computed once per model and kept. */
export interface SimilarityView {
  data: SignalData;
  f: Float64Array; // f_j (all ones when IUF is off)
  rowX: Float64Array; // x_uj in student order
  colX: Float64Array; // x_uj in course order
  norm: Float64Array; // sqrt(sum_j (f_j x_uj)^2) over the student's own courses
  dense: DenseBlock;
}

/** One similarity's data: a signal's residuals or enrolment. */
export type SimilarityComponent = Signal | 'enrolment';

/** The similarities a source averages. */
export function componentsOf(source: Settings['gradeSimilarity']): SimilarityComponent[] {
  switch (source) {
    case 'both':
      return ['grade', 'satisfaction'];
    case 'satisfaction+enrolment':
      return ['satisfaction', 'enrolment'];
    default:
      return [source];
  }
}

export function similarityView(
  model: Model,
  component: SimilarityComponent,
  settings: Settings,
): SimilarityView {
  const d = component === 'enrolment' ? model.enrolment : model.signals[component];
  const C = model.courseKeys.length;
  const S = model.studentKeys.length;
  if (!d.iuf) {
    const iuf = sharedF64(C);
    for (let c = 0; c < C; c++) {
      const n = d.colPtr[c + 1] - d.colPtr[c];
      iuf[c] = n > 0 ? Math.log(d.active / n) : 0;
    }
    d.iuf = iuf;
  }
  const center =
    component !== 'enrolment' &&
    (settings.similarity === 'pearson' || settings.centring !== 'none');
  if (center && !d.rowCentered) {
    const rc = sharedF64(d.rowValue.length);
    for (let s = 0; s < S; s++) {
      for (let p = d.rowPtr[s]; p < d.rowPtr[s + 1]; p++) {
        rc[p] = d.rowValue[p] - d.mean[s] - d.courseShift[d.rowCourse[p]];
      }
    }
    d.rowCentered = rc;
  }
  if (center) centeredColumns(d);
  const f = settings.iuf ? (d.iuf as Float64Array) : ones(C);
  const rowX = center ? (d.rowCentered as Float64Array) : d.rowValue;
  const colX = center ? (d.colCentered as Float64Array) : d.colValue;
  const key = `${settings.iuf ? 1 : 0}${center ? 1 : 0}`;
  let norm = d.norms[key];
  if (!norm) {
    norm = sharedF64(S);
    for (let s = 0; s < S; s++) {
      let sum = 0;
      for (let p = d.rowPtr[s]; p < d.rowPtr[s + 1]; p++) {
        const t = f[d.rowCourse[p]] * rowX[p];
        sum += t * t;
      }
      norm[s] = Math.sqrt(sum);
    }
    d.norms[key] = norm;
  }
  const dkey = center ? 'c' : 'r';
  let dense = d.dense[dkey];
  if (!dense) {
    dense = denseBlock(d, C, S, rowX);
    d.dense[dkey] = dense;
  }
  return { data: d, f, rowX, colX, norm, dense };
}

function denseBlock(d: SignalData, C: number, S: number, rowX: Float64Array): DenseBlock {
  const slot = sharedI32(C).fill(-1);
  let width = 0;
  for (let c = 0; c < C; c++) {
    const n = d.colPtr[c + 1] - d.colPtr[c];
    if (n > 0 && n >= DENSE_SHARE * S) slot[c] = width++;
  }
  const x = sharedF64(width * S);
  if (width > 0) {
    for (let s = 0; s < S; s++) {
      for (let p = d.rowPtr[s]; p < d.rowPtr[s + 1]; p++) {
        const g = slot[d.rowCourse[p]];
        if (g >= 0) x[s * width + g] = rowX[p];
      }
    }
  }
  return { slot, width, x };
}

const onesCache = new Map<number, Float64Array>();
function ones(n: number): Float64Array {
  let a = onesCache.get(n);
  if (!a) {
    a = sharedF64(n).fill(1);
    onesCache.set(n, a);
  }
  return a;
}

/** r_uj - m_u in course order (the neighbours' deviations a scan reads); made once. */
export function centeredColumns(d: SignalData): Float64Array {
  if (!d.colCentered) {
    const cc = sharedF64(d.colValue.length);
    const C = d.colPtr.length - 1;
    for (let c = 0; c < C; c++) {
      const shift = d.courseShift[c];
      for (let p = d.colPtr[c]; p < d.colPtr[c + 1]; p++) {
        cc[p] = d.colValue[p] - d.mean[d.colStudent[p]] - shift;
      }
    }
    d.colCentered = cc;
  }
  return d.colCentered;
}

/** Every derived array for the given settings, so that a snapshot carries them to workers. */
export function prepare(model: Model, settings: Settings): Model {
  unionRows(model);
  const m = modelFor(model, settings);
  for (const source of [settings.gradeSimilarity, settings.satisfactionSimilarity]) {
    for (const c of componentsOf(source)) similarityView(m, c, settings);
  }
  for (const s of SIGNALS) centeredColumns(m.signals[s]);
  return m;
}

/**
 * Every course a student has a value for in either signal, ascending, one 32-bit entry each:
 * course * 2^16 + (grade value id + 1) * 2^9 + (satisfaction value id + 1) * 4 + bits (1: has
 * a grade, 2: has a satisfaction value); id + 1 is 0 when there is no value. Walking
 * neighbours for both signals reads this one compact row instead of two rows of courses and
 * values. Possible when there are at most 2^15 courses and 127 distinct values per signal
 * (grade points of a scale, 1-5); otherwise `ok` is false and walks read both rows.
 */
export interface UnionRows {
  ok: boolean;
  ptr: Int32Array;
  /** Entries of each row, rarest course first (by `popularity`). */
  code: Int32Array;
  /**
   * Popularity position of each course: 0 for the course with most values in either signal
   * (ties by course index). A walk that has filled every course above some position can stop
   * reading a row at the first entry above it.
   */
  popularity: Int32Array;
  /** Courses by popularity position, most popular first. */
  byPopularity: Int32Array;
  /** Each student's grade and satisfaction means side by side (one cache line for a walk). */
  means: Float64Array;
  /** The distinct values per signal, by id. */
  gradeValues: Float64Array;
  satisfactionValues: Float64Array;
}

const MAX_VALUE_IDS = 127;

/** Distinct values of a signal by id (first-seen order), or null when there are too many. */
function valueIds(d: SignalData): { ids: Int32Array; values: Float64Array } | null {
  const idOf = new Map<number, number>();
  const values: number[] = [];
  const ids = new Int32Array(d.rowValue.length);
  for (let p = 0; p < d.rowValue.length; p++) {
    const v = d.rowValue[p];
    let id = idOf.get(v);
    if (id === undefined) {
      if (values.length === MAX_VALUE_IDS) return null;
      id = values.length;
      idOf.set(v, id);
      values.push(v);
    }
    // -0 and 0 share a map key; keep the exact value or give up.
    if (!Object.is(values[id], v)) return null;
    ids[p] = id;
  }
  const out = sharedF64(values.length);
  out.set(values);
  return { ids, values: out };
}

export function unionRows(model: Model): UnionRows {
  if (model.union) return model.union;
  const g = model.signals.grade;
  const s = model.signals.satisfaction;
  const S = model.studentKeys.length;
  const gi = valueIds(g);
  const si = valueIds(s);
  if (!gi || !si || model.courseKeys.length > 1 << 15) {
    model.union = {
      ok: false,
      ptr: sharedI32(0),
      code: sharedI32(0),
      popularity: sharedI32(0),
      byPopularity: sharedI32(0),
      means: sharedF64(0),
      gradeValues: sharedF64(0),
      satisfactionValues: sharedF64(0),
    };
    return model.union;
  }
  const ptr = sharedI32(S + 1);
  for (let u = 0; u < S; u++) {
    let p = g.rowPtr[u];
    let q = s.rowPtr[u];
    const pe = g.rowPtr[u + 1];
    const qe = s.rowPtr[u + 1];
    let n = 0;
    while (p < pe || q < qe) {
      const a = p < pe ? g.rowCourse[p] : 0x7fffffff;
      const b = q < qe ? s.rowCourse[q] : 0x7fffffff;
      if (a <= b) p++;
      if (b <= a) q++;
      n++;
    }
    ptr[u + 1] = ptr[u] + n;
  }
  const C = model.courseKeys.length;
  const count = new Int32Array(C);
  const byPopularity = sharedI32(C);
  const popularity = sharedI32(C);
  const code = sharedI32(ptr[S]);
  let e = 0;
  for (let u = 0; u < S; u++) {
    let p = g.rowPtr[u];
    let q = s.rowPtr[u];
    const pe = g.rowPtr[u + 1];
    const qe = s.rowPtr[u + 1];
    while (p < pe || q < qe) {
      const a = p < pe ? g.rowCourse[p] : 0x7fffffff;
      const b = q < qe ? s.rowCourse[q] : 0x7fffffff;
      const c = a <= b ? a : b;
      let x = c * 65536;
      if (a === c) {
        x += (gi.ids[p] + 1) * 512 + 1;
        p++;
      }
      if (b === c) {
        x += (si.ids[q] + 1) * 4 + 2;
        q++;
      }
      code[e++] = x;
      count[c]++;
    }
  }
  const order = Array.from({ length: C }, (_, c) => c).sort((x, y) => count[y] - count[x] || x - y);
  for (let r = 0; r < C; r++) {
    byPopularity[r] = order[r];
    popularity[order[r]] = r;
  }
  // Rarest first within each row: insertion sort, rows are short.
  for (let u = 0; u < S; u++) {
    const lo = ptr[u];
    for (let p = lo + 1; p < ptr[u + 1]; p++) {
      const x = code[p];
      const r = popularity[x >> 16];
      let q = p - 1;
      while (q >= lo && popularity[code[q] >> 16] < r) {
        code[q + 1] = code[q];
        q--;
      }
      code[q + 1] = x;
    }
  }
  const means = sharedF64(2 * S);
  for (let u = 0; u < S; u++) {
    means[2 * u] = g.mean[u];
    means[2 * u + 1] = s.mean[u];
  }
  model.union = {
    ok: true,
    ptr,
    code,
    popularity,
    byPopularity,
    means,
    gradeValues: gi.values,
    satisfactionValues: si.values,
  };
  return model.union;
}

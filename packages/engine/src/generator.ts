import { seededRandom } from './evaluate';

/**
 * An invented university (Halden Reach University) for benchmarks and demos: a common core
 * everyone takes, programmes with required courses (so similar students really exist),
 * electives with Zipf-like popularity, terms over several years, grade points on the 4-point
 * letter scale and 1-5 satisfaction with gaps. Fully determined by the seed.
 */
export interface UniversityOptions {
  students?: number; // 200,000
  courses?: number; // 3,000
  coreCourses?: number; // 8
  programmes?: number; // 40
  requiredPerProgramme?: number; // 12
  /** Courses per student are uniform in [min, max]; the default mean of 40 gives ~8 M records. */
  minCoursesPerStudent?: number; // 20
  maxCoursesPerStudent?: number; // 60
  firstYear?: number; // 2016
  years?: number; // 9
  seed?: number;
}

export interface University {
  students: string[]; // per record
  courses: string[];
  terms: string[];
  grades: Float64Array; // NaN: a mark without grade points (W)
  satisfaction: Float64Array; // NaN: no survey answer
  studentKeys: string[];
  courseKeys: string[];
  coreCourses: string[];
  /** Every course outside the common core. */
  electives: string[];
  /** Terms in order. */
  termKeys: string[];
  programmeOf: Int32Array;
}

const DEPARTMENTS = [
  'ARC', 'AST', 'BIO', 'CHM', 'CMP', 'DAN', 'ECN', 'EDU', 'ENG', 'ENV',
  'FIN', 'GEO', 'HIS', 'LAW', 'LIN', 'MAR', 'MTH', 'MUS', 'NUR', 'OCN',
  'PHL', 'PHY', 'POL', 'PSY', 'SOC', 'STA', 'THE', 'TRN', 'VIS', 'WRT',
]; // prettier-ignore

const LETTERS = [0, 0.7, 1, 1.3, 1.7, 2, 2.3, 2.7, 3, 3.3, 3.7, 4];
const SEASONS = ['SP', 'FA'];
const DIM = 4;

/** Compare registrar terms `YYYY-XX` with WI < SP < SU < FA; other strings in string order. */
export function registrarTermOrder(a: string, b: string): number {
  const order = (t: string): number => {
    const m = /^(\d{4})-(WI|SP|SU|FA)$/.exec(t);
    return m ? Number(m[1]) * 4 + ['WI', 'SP', 'SU', 'FA'].indexOf(m[2]) : NaN;
  };
  const x = order(a);
  const y = order(b);
  if (x === x && y === y) return x - y;
  return a < b ? -1 : a > b ? 1 : 0;
}

export function generateUniversity(options: UniversityOptions = {}): University {
  const S = options.students ?? 200_000;
  const C = options.courses ?? 3_000;
  const nCore = options.coreCourses ?? 8;
  const P = options.programmes ?? 40;
  const nReq = options.requiredPerProgramme ?? 12;
  const kMin = options.minCoursesPerStudent ?? 20;
  const kMax = options.maxCoursesPerStudent ?? 60;
  const firstYear = options.firstYear ?? 2016;
  const years = options.years ?? 9;
  const rnd = seededRandom(options.seed ?? 20_240_917);
  const normal = (): number => {
    const u = 1 - rnd();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rnd());
  };

  // Courses: the core, then departments in turn.
  const D = DEPARTMENTS.length;
  const courseKeys: string[] = [];
  const deptOf = new Int32Array(C);
  const used = new Set<string>();
  for (let c = 0; c < C; c++) {
    let key: string;
    if (c < nCore) {
      key = `HRC ${1010 + 10 * c}`;
      deptOf[c] = -1;
    } else {
      const d = (c - nCore) % D;
      deptOf[c] = d;
      const n = Math.floor((c - nCore) / D);
      key = `${DEPARTMENTS[d]} ${1000 + (n % 4) * 1000 + 10 * Math.floor(n / 4) + (n % 3)}`;
    }
    while (used.has(key)) key = key + 'X';
    used.add(key);
    courseKeys.push(key);
  }
  const terms: string[] = [];
  for (let y = 0; y < years; y++) for (const s of SEASONS) terms.push(`${firstYear + y}-${s}`);
  const deptCourses: number[][] = Array.from({ length: D }, () => []);
  for (let c = nCore; c < C; c++) deptCourses[deptOf[c]].push(c);

  // Latent traits: departments and programmes have directions; courses lean towards their department.
  const vec = (scale: number): Float64Array =>
    Float64Array.from({ length: DIM }, () => normal() * scale);
  const deptVec = Array.from({ length: D }, () => vec(1));
  const courseVec: Float64Array[] = [];
  const difficulty = new Float64Array(C);
  for (let c = 0; c < C; c++) {
    const v = vec(0.35);
    if (deptOf[c] >= 0) for (let x = 0; x < DIM; x++) v[x] += 0.5 * deptVec[deptOf[c]][x];
    courseVec.push(v);
    difficulty[c] = normal() * 0.35;
  }
  const progDept = Int32Array.from({ length: P }, (_, p) => p % D);
  const progVec = Array.from({ length: P }, (_, p) => {
    const v = vec(0.6);
    for (let x = 0; x < DIM; x++) v[x] += deptVec[progDept[p]][x];
    return v;
  });
  const progReq: number[][] = Array.from({ length: P }, (_, p) => {
    const pool = deptCourses[progDept[p]];
    const off = Math.floor(p / D) * 5; // Two programmes in one department share part of their core.
    return Array.from(
      { length: Math.min(nReq, pool.length) },
      (_, i) => pool[(off + i) % pool.length],
    );
  });

  // Zipf-like popularity: over all electives, and within each department.
  const zipfCdf = (n: number, s: number): Float64Array => {
    const cdf = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) cdf[i] = sum += 1 / Math.pow(i + 1, s);
    for (let i = 0; i < n; i++) cdf[i] /= sum;
    return cdf;
  };
  const pick = (cdf: Float64Array): number => {
    const u = rnd();
    let lo = 0;
    let hi = cdf.length - 1;
    while (lo < hi) {
      const m = (lo + hi) >> 1;
      if (cdf[m] < u) lo = m + 1;
      else hi = m;
    }
    return lo;
  };
  const electiveIds = Int32Array.from({ length: C - nCore }, (_, i) => nCore + i);
  // Shuffle so that popularity is not tied to department order.
  for (let i = electiveIds.length - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [electiveIds[i], electiveIds[j]] = [electiveIds[j], electiveIds[i]];
  }
  const globalCdf = zipfCdf(electiveIds.length, 1.0);
  const deptCdf = deptCourses.map((pool) => zipfCdf(pool.length, 0.8));

  // Students.
  const studentKeys: string[] = [];
  const programmeOf = new Int32Array(S);
  const counts = new Int32Array(S);
  let total = 0;
  for (let s = 0; s < S; s++) {
    studentKeys.push(`HR${String(100000 + s * 7 + (s % 5)).padStart(7, '0')}`);
    programmeOf[s] = Math.floor(rnd() * P);
    counts[s] = kMin + Math.floor(rnd() * (kMax - kMin + 1));
    total += counts[s];
  }
  const students: string[] = new Array<string>(total);
  const courses: string[] = new Array<string>(total);
  const termCol: string[] = new Array<string>(total);
  const grades = new Float64Array(total);
  const satisfaction = new Float64Array(total);
  const taken = new Uint8Array(C);
  const list: number[] = [];
  let r = 0;
  const perTerm = 5;
  for (let s = 0; s < S; s++) {
    const p = programmeOf[s];
    const K = counts[s];
    list.length = 0;
    const add = (c: number): void => {
      if (!taken[c] && list.length < K) {
        taken[c] = 1;
        list.push(c);
      }
    };
    for (let c = 0; c < nCore; c++) add(c);
    for (const c of progReq[p]) add(c);
    const pool = deptCourses[progDept[p]];
    let guard = 0;
    while (list.length < K && guard++ < 10 * K) {
      if (rnd() < 0.6) add(pool[pick(deptCdf[progDept[p]])]);
      else add(electiveIds[pick(globalCdf)]);
    }
    const nTerms = Math.ceil(list.length / perTerm);
    const startMax = Math.max(0, terms.length - nTerms);
    const start = Math.floor(rnd() * (startMax + 1));
    const ability = normal() * 0.5;
    const sv = vec(0.5);
    for (let x = 0; x < DIM; x++) sv[x] += progVec[p][x];
    for (let i = 0; i < list.length; i++) {
      const c = list[i];
      taken[c] = 0;
      let dot = 0;
      for (let x = 0; x < DIM; x++) dot += sv[x] * courseVec[c][x];
      const g = 2.9 + ability - difficulty[c] + 0.25 * dot + normal() * 0.45;
      let best = 0;
      for (let l = 1; l < LETTERS.length; l++) {
        if (Math.abs(LETTERS[l] - g) < Math.abs(LETTERS[best] - g)) best = l;
      }
      students[r] = studentKeys[s];
      courses[r] = courseKeys[c];
      termCol[r] = terms[Math.min(terms.length - 1, start + Math.floor(i / perTerm))];
      grades[r] = rnd() < 0.03 ? NaN : LETTERS[best];
      if (rnd() < 0.65) {
        const v = Math.round(3.2 + 0.35 * dot + 0.3 * ability + normal() * 0.7);
        satisfaction[r] = v < 1 ? 1 : v > 5 ? 5 : v;
      } else satisfaction[r] = NaN;
      r++;
    }
  }
  return {
    students: r === total ? students : students.slice(0, r),
    courses: r === total ? courses : courses.slice(0, r),
    terms: r === total ? termCol : termCol.slice(0, r),
    grades: grades.subarray(0, r),
    satisfaction: satisfaction.subarray(0, r),
    studentKeys,
    courseKeys,
    coreCourses: courseKeys.slice(0, nCore),
    electives: courseKeys.slice(nCore),
    termKeys: terms,
    programmeOf,
  };
}

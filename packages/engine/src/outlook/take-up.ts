import {
  markPassed,
  prerequisiteMet,
  stageOf,
  STAGES,
  yearOf,
  YEARS,
  type OutlookData,
  type StudentTerms,
} from './data';

/** Prior weight of the smoothing (method.md: a = 5). */
export const SMOOTHING = 5;
/** Terms of history behind the take-up rates. */
export const HISTORY_TERMS = 6;

/**
 * Take-up counts of one history term h: open pairs (m) and enrolments among them (n), by
 * course, programme, stage and (level, year). A pair counts when c is an offered elective of h
 * that s has not passed before h and whose prerequisites s had passed: rates over pairs a
 * student could not take would mix how often a course is chosen with how many could choose it.
 * Counts are additive over terms, so each term is counted once and tables sum them.
 */
export interface TermCounts {
  term: number;
  nc: Float32Array;
  mc: Float32Array;
  ncp: Float32Array;
  mcp: Float32Array;
  nck: Float32Array;
  mck: Float32Array;
  ncpk: Float32Array;
  mcpk: Float32Array;
  nly: Float32Array;
  mly: Float32Array;
}

export function levelsOf(data: OutlookData): number {
  let levels = 1;
  for (let c = 0; c < data.courseCount; c++) levels = Math.max(levels, data.courseLevel[c] + 1);
  return levels;
}

export function termCounts(data: OutlookData, st: StudentTerms, h: number): TermCounts {
  const C = data.courseCount;
  const P = data.programmeCount;
  const K = STAGES;
  const Y = YEARS;
  const L = levelsOf(data);
  const counts: TermCounts = {
    term: h,
    nc: new Float32Array(C),
    mc: new Float32Array(C),
    ncp: new Float32Array(C * P),
    mcp: new Float32Array(C * P),
    nck: new Float32Array(C * K),
    mck: new Float32Array(C * K),
    ncpk: new Float32Array(C * P * K),
    mcpk: new Float32Array(C * P * K),
    nly: new Float32Array(L * Y),
    mly: new Float32Array(L * Y),
  };
  const { nc, mc, ncp, mcp, nck, mck, ncpk, mcpk, nly, mly } = counts;
  const courses = data.offerings.get(h);
  const students = st.byTerm.get(h);
  if (!courses || !students) return counts;
  const offered = new Uint8Array(C);
  const passed = new Uint8Array(C);
  const passedList = new Int32Array(C);
  const closed = new Uint8Array(C);
  const closedList = new Int32Array(C);
  const enrolled = new Uint8Array(C);
  const npk = new Float64Array(P * K);
  const ny = new Float64Array(Y);
  const levelCount = new Float64Array(L);
  const gated = [...courses].filter((c) => data.prerequisites[c] !== null);
  let passedCount = 0;
  for (const c of courses) {
    offered[c] = 1;
    levelCount[data.courseLevel[c]]++;
  }
  for (const s of students) {
    const p = data.studentProgramme[s];
    const k = stageOf(st, s, h);
    const y = yearOf(data, s, h);
    npk[p * K + k]++;
    ny[y]++;
    passedCount = markPassed(data, s, h, passed, passedList, passedCount);
    // Pairs that are not open come off the counts the dense loop below adds for everyone.
    let closedCount = 0;
    for (let i = 0; i < passedCount; i++) {
      const c = passedList[i];
      if (offered[c] && !closed[c]) closedList[closedCount++] = c;
      closed[c] = 1;
    }
    for (const c of gated) {
      if (!closed[c] && !prerequisiteMet(data.prerequisites[c], passed)) {
        closed[c] = 1;
        closedList[closedCount++] = c;
      }
    }
    for (let i = 0; i < closedCount; i++) {
      const c = closedList[i];
      mc[c]--;
      mcp[c * P + p]--;
      mck[c * K + k]--;
      mcpk[(c * P + p) * K + k]--;
      mly[data.courseLevel[c] * Y + y]--;
    }
    for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
      if (data.recordTerm[r] !== h) continue;
      const c = data.recordCourse[r];
      if (!offered[c] || closed[c] || enrolled[c]) continue;
      enrolled[c] = 1;
      nc[c]++;
      ncp[c * P + p]++;
      nck[c * K + k]++;
      ncpk[(c * P + p) * K + k]++;
      nly[data.courseLevel[c] * Y + y]++;
    }
    for (let r = data.recordFrom[s]; r < data.recordFrom[s + 1]; r++) {
      enrolled[data.recordCourse[r]] = 0;
    }
    for (let i = 0; i < closedCount; i++) closed[closedList[i]] = 0;
    for (let i = 0; i < passedCount; i++) closed[passedList[i]] = 0;
  }
  for (const c of courses) {
    for (let p = 0; p < P; p++) {
      for (let k = 0; k < K; k++) {
        const n = npk[p * K + k];
        if (n === 0) continue;
        mc[c] += n;
        mcp[c * P + p] += n;
        mck[c * K + k] += n;
        mcpk[(c * P + p) * K + k] += n;
      }
    }
  }
  for (let l = 0; l < L; l++) {
    if (levelCount[l] === 0) continue;
    for (let y = 0; y < Y; y++) mly[l * Y + y] += levelCount[l] * ny[y];
  }
  return counts;
}

/**
 * Smoothed take-up rates over the open pairs of the history H(t) (method.md, "Take-up
 * rates"): each finer table shrinks towards the coarser one it refines.
 */
export interface TakeUpTable {
  /** The term the table serves and its history terms. */
  term: number;
  history: Int32Array;
  rbar: number;
  levels: number;
  programmes: number;
  /** Raw counts summed over the history, kept for the take-up forecast and for checks. */
  nc: Float64Array;
  mc: Float64Array;
  nck: Float64Array;
  mck: Float64Array;
  nly: Float64Array;
  mly: Float64Array;
  rc: Float64Array;
  rcp: Float64Array;
  rck: Float64Array;
  rcpk: Float64Array;
  rly: Float64Array;
  /** Natural logs of the rates, for the features. */
  lrc: Float64Array;
  lrcp: Float64Array;
  lrck: Float64Array;
  lrcpk: Float64Array;
  lrly: Float64Array;
}

/** The HISTORY_TERMS latest record terms before t. */
export function historyOf(st: StudentTerms, term: number): Int32Array {
  const before = st.recordTerms.filter((t) => t < term);
  return before.slice(Math.max(0, before.length - HISTORY_TERMS));
}

function summed(parts: readonly Float32Array[], length: number): Float64Array {
  const out = new Float64Array(length);
  for (const part of parts) for (let i = 0; i < length; i++) out[i] += part[i];
  return out;
}

export function takeUpTable(
  data: OutlookData,
  st: StudentTerms,
  term: number,
  countsOf: (h: number) => TermCounts = (h) => termCounts(data, st, h),
): TakeUpTable {
  const C = data.courseCount;
  const P = data.programmeCount;
  const K = STAGES;
  const Y = YEARS;
  const L = levelsOf(data);
  const history = historyOf(st, term);
  const parts = [...history].map(countsOf);
  const nc = summed(
    parts.map((x) => x.nc),
    C,
  );
  const mc = summed(
    parts.map((x) => x.mc),
    C,
  );
  const ncp = summed(
    parts.map((x) => x.ncp),
    C * P,
  );
  const mcp = summed(
    parts.map((x) => x.mcp),
    C * P,
  );
  const nck = summed(
    parts.map((x) => x.nck),
    C * K,
  );
  const mck = summed(
    parts.map((x) => x.mck),
    C * K,
  );
  const ncpk = summed(
    parts.map((x) => x.ncpk),
    C * P * K,
  );
  const mcpk = summed(
    parts.map((x) => x.mcpk),
    C * P * K,
  );
  const nly = summed(
    parts.map((x) => x.nly),
    L * Y,
  );
  const mly = summed(
    parts.map((x) => x.mly),
    L * Y,
  );

  let sn = 0;
  let sm = 0;
  for (let c = 0; c < C; c++) {
    sn += nc[c];
    sm += mc[c];
  }
  // With no history at all every rate is rbar, and a choice among equals needs no particular value.
  const rbar = sm > 0 && sn > 0 ? sn / sm : 0.1;
  const a = SMOOTHING;
  const rc = new Float64Array(C);
  const rcp = new Float64Array(C * P);
  const rck = new Float64Array(C * K);
  const rcpk = new Float64Array(C * P * K);
  const rly = new Float64Array(L * Y);
  for (let c = 0; c < C; c++) {
    rc[c] = (nc[c] + a * rbar) / (mc[c] + a);
    for (let p = 0; p < P; p++) {
      const i = c * P + p;
      rcp[i] = (ncp[i] + a * rc[c]) / (mcp[i] + a);
    }
    for (let k = 0; k < K; k++) {
      const i = c * K + k;
      rck[i] = (nck[i] + a * rc[c]) / (mck[i] + a);
    }
    for (let p = 0; p < P; p++) {
      for (let k = 0; k < K; k++) {
        const i = (c * P + p) * K + k;
        rcpk[i] = (ncpk[i] + a * rck[c * K + k]) / (mcpk[i] + a);
      }
    }
  }
  for (let i = 0; i < L * Y; i++) rly[i] = (nly[i] + a * rbar) / (mly[i] + a);
  return {
    term,
    history,
    rbar,
    levels: L,
    programmes: P,
    nc,
    mc,
    nck,
    mck,
    nly,
    mly,
    rc,
    rcp,
    rck,
    rcpk,
    rly,
    lrc: rc.map(Math.log),
    lrcp: rcp.map(Math.log),
    lrck: rck.map(Math.log),
    lrcpk: rcpk.map(Math.log),
    lrly: rly.map(Math.log),
  };
}

/** The choice model's base features, in θ order (method.md, "Choice"). */
export const BASE_FEATURES = 6;

/**
 * Writes the features of (c, p, k, y, u) at `out[at..at+6)`: ln r_c, ln(r_cp/r_c),
 * ln(r_ck/r_c), ln(r_cpk/r_ck), ln r_ly, u.
 */
export function writeFeatures(
  table: TakeUpTable,
  level: number,
  c: number,
  p: number,
  k: number,
  y: number,
  u: number,
  out: Float64Array,
  at: number,
): void {
  const P = table.programmes;
  const lrc = table.lrc[c];
  const lrck = table.lrck[c * STAGES + k];
  out[at] = lrc;
  out[at + 1] = table.lrcp[c * P + p] - lrc;
  out[at + 2] = lrck - lrc;
  out[at + 3] = table.lrcpk[(c * P + p) * STAGES + k] - lrck;
  out[at + 4] = table.lrly[level * YEARS + y];
  out[at + 5] = u;
}

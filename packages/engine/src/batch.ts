import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { resolveSettings, scorerFor } from './api';
import { Model, prepare } from './model';
import {
  BASIS_NAMES,
  CONFIDENCE_NAMES,
  DEFAULT_SCALES,
  fitScore,
  fitSource,
  Scorer,
  targetSignal,
  untakenCourses,
} from './score';
import { Settings, Signal, SIGNALS, StudentPrediction } from './types';

/** One signal's results for one student in compact form; NaN marks "no value". */
export interface CompactSignal {
  value: Float64Array;
  kin: Int32Array;
  /** 0 none, 1 baseline, 2 neighbours (BASIS_NAMES). */
  basis: Uint8Array;
  /** 0 low, 1 medium, 2 high (CONFIDENCE_NAMES). */
  confidence: Uint8Array;
  /** Kin strength (summed |w|), 0 on the baseline. */
  strength: Float64Array;
}

/** One student's scores over many courses, as typed arrays (position t = course `courses[t]`). */
export interface StudentScores {
  student: string;
  /** Position of the student in the request. */
  position: number;
  /** Course indices into model.courseKeys. */
  courses: Int32Array;
  grade: CompactSignal | null;
  satisfaction: CompactSignal | null;
  /** 0-100, NaN when neither signal has a value. */
  fit: Float64Array;
  confidence: Uint8Array;
}

export interface BatchRequest {
  /** Student keys to score. */
  students: readonly string[];
  /** Candidate courses for everyone (course keys); every course when absent. */
  courses?: readonly string[];
  /** Keep courses the student already has a value for in the similarity signal (default false). */
  includeTaken?: boolean;
  signals?: readonly Signal[];
  settings?: Partial<Settings>;
}

export interface BatchOptions {
  /** Worker threads; 0 scores in the calling thread. Default: the machine's parallelism. */
  workers?: number;
  /** Students per message to a worker. */
  chunkSize?: number;
  onProgress?: (done: number, total: number) => void;
  /** Called for each student as results arrive (completion order); nothing is kept then. */
  onStudent?: (scores: StudentScores) => void;
  signal?: AbortSignal;
  /** The compiled worker script; see defaultWorkerPath. */
  workerPath?: string;
}

/**
 * Where the worker script is: `worker.js` beside this module when running compiled (dist/),
 * else `../dist/worker.js` when this module runs from src/ (tests; build first).
 */
export function defaultWorkerPath(): string {
  const beside = join(__dirname, 'worker.js');
  if (existsSync(beside)) return beside;
  return join(__dirname, '..', 'dist', 'worker.js');
}

interface Job {
  courseIdx: Int32Array | null;
  includeTaken: boolean;
  signals: Signal[];
  settings: Settings;
}

function targetsFor(model: Model, a: number, job: Job): Int32Array {
  const sig = targetSignal(job.settings);
  if (!job.courseIdx) return job.includeTaken ? allCourses(model) : untakenCourses(model, a, sig);
  if (job.includeTaken || a < 0) return job.courseIdx;
  const d = model.signals[sig];
  const out = new Int32Array(job.courseIdx.length);
  let n = 0;
  for (const j of job.courseIdx) {
    if (j >= 0 && hasValue(d.rowPtr, d.rowCourse, a, j)) continue;
    out[n++] = j;
  }
  return out.subarray(0, n);
}

function hasValue(rowPtr: Int32Array, rowCourse: Int32Array, a: number, j: number): boolean {
  let lo = rowPtr[a];
  let hi = rowPtr[a + 1] - 1;
  while (lo <= hi) {
    const m = (lo + hi) >> 1;
    if (rowCourse[m] === j) return true;
    if (rowCourse[m] < j) lo = m + 1;
    else hi = m - 1;
  }
  return false;
}

function allCourses(model: Model): Int32Array {
  return Int32Array.from({ length: model.courseKeys.length }, (_, c) => c);
}

/** A chunk of students packed into a few flat arrays, so a worker can transfer it in one go. */
export interface PackedChunk {
  first: number;
  offsets: Int32Array;
  courses: Int32Array;
  value: Float64Array[]; // per requested signal
  kin: Int32Array[];
  basis: Uint8Array[];
  conf: Uint8Array[];
  strength: Float64Array[];
  fit: Float64Array;
  fitConf: Uint8Array;
}

/** Score students [first, first + count) of a request in this thread (the worker's job too). */
export function scoreChunk(
  model: Model,
  scorer: Scorer,
  studentKeys: readonly string[],
  first: number,
  count: number,
  job: Job,
): PackedChunk {
  const targets: Int32Array[] = [];
  const offsets = new Int32Array(count + 1);
  for (let x = 0; x < count; x++) {
    const a = model.studentIndex.get(studentKeys[first + x]) ?? -1;
    const t = targetsFor(model, a, job);
    targets.push(t);
    offsets[x + 1] = offsets[x] + t.length;
  }
  const total = offsets[count];
  const ns = job.signals.length;
  const chunk: PackedChunk = {
    first,
    offsets,
    courses: new Int32Array(total),
    value: Array.from({ length: ns }, () => new Float64Array(total)),
    kin: Array.from({ length: ns }, () => new Int32Array(total)),
    basis: Array.from({ length: ns }, () => new Uint8Array(total)),
    conf: Array.from({ length: ns }, () => new Uint8Array(total)),
    strength: Array.from({ length: ns }, () => new Float64Array(total)),
    fit: new Float64Array(total),
    fitConf: new Uint8Array(total),
  };
  const gs = model.scales.grade ?? DEFAULT_SCALES.grade;
  const ss = model.scales.satisfaction ?? DEFAULT_SCALES.satisfaction;
  const gi = job.signals.indexOf('grade');
  const si = job.signals.indexOf('satisfaction');
  for (let x = 0; x < count; x++) {
    const a = model.studentIndex.get(studentKeys[first + x]) ?? -1;
    const t = targets[x];
    scorer.score(a, t, job.settings, job.signals);
    const o = offsets[x];
    chunk.courses.set(t, o);
    for (let z = 0; z < ns; z++) {
      const r = scorer.out[job.signals[z]];
      chunk.value[z].set(r.value.subarray(0, t.length), o);
      chunk.kin[z].set(r.kin.subarray(0, t.length), o);
      chunk.basis[z].set(r.basis.subarray(0, t.length), o);
      chunk.conf[z].set(r.confidence.subarray(0, t.length), o);
      chunk.strength[z].set(r.strength.subarray(0, t.length), o);
    }
    for (let p = 0; p < t.length; p++) {
      const g = gi >= 0 ? chunk.value[gi][o + p] : NaN;
      const s = si >= 0 ? chunk.value[si][o + p] : NaN;
      const from = fitSource(g, s);
      chunk.fit[o + p] = fitScore(g, s, job.settings.alpha, gs, ss);
      chunk.fitConf[o + p] =
        from === 0
          ? Math.min(chunk.conf[gi][o + p], chunk.conf[si][o + p])
          : from === 1
            ? chunk.conf[gi][o + p]
            : from === 2
              ? chunk.conf[si][o + p]
              : 0;
    }
  }
  return chunk;
}

function chunkBuffers(c: PackedChunk): ArrayBuffer[] {
  const all = [
    c.offsets,
    c.courses,
    c.fit,
    c.fitConf,
    ...c.value,
    ...c.kin,
    ...c.basis,
    ...c.conf,
    ...c.strength,
  ];
  return all.map((a) => a.buffer as ArrayBuffer);
}

function unpack(
  c: PackedChunk,
  students: readonly string[],
  signals: readonly Signal[],
  emit: (s: StudentScores) => void,
): void {
  for (let x = 0; x + 1 < c.offsets.length; x++) {
    const lo = c.offsets[x];
    const hi = c.offsets[x + 1];
    const sig = (s: Signal): CompactSignal | null => {
      const z = signals.indexOf(s);
      if (z < 0) return null;
      return {
        value: c.value[z].subarray(lo, hi),
        kin: c.kin[z].subarray(lo, hi),
        basis: c.basis[z].subarray(lo, hi),
        confidence: c.conf[z].subarray(lo, hi),
        strength: c.strength[z].subarray(lo, hi),
      };
    };
    emit({
      student: students[c.first + x],
      position: c.first + x,
      courses: c.courses.subarray(lo, hi),
      grade: sig('grade'),
      satisfaction: sig('satisfaction'),
      fit: c.fit.subarray(lo, hi),
      confidence: c.fitConf.subarray(lo, hi),
    });
  }
}

/** Compact scores as the objects predictStudent returns (for display and for comparison). */
export function toStudentPrediction(model: Model, s: StudentScores): StudentPrediction {
  const one = (c: CompactSignal | null, t: number) => {
    if (!c)
      return {
        value: null,
        neighbours: 0,
        basis: 'none' as const,
        spread: null,
        confidence: 'low' as const,
        strength: 0,
      };
    const v = c.value[t];
    return {
      value: v === v ? v : null,
      neighbours: c.kin[t],
      basis: BASIS_NAMES[c.basis[t]],
      spread: null,
      confidence: CONFIDENCE_NAMES[c.confidence[t]],
      strength: c.strength[t],
    };
  };
  const predictions = [];
  for (let t = 0; t < s.courses.length; t++) {
    const g = one(s.grade, t);
    const sat = one(s.satisfaction, t);
    const f = s.fit[t];
    predictions.push({
      course: model.courseKeys[s.courses[t]] ?? '',
      grade: g,
      satisfaction: sat,
      fit: f === f ? f : null,
      fitFrom:
        g.value !== null && sat.value !== null
          ? ('both' as const)
          : g.value !== null
            ? ('grade' as const)
            : sat.value !== null
              ? ('satisfaction' as const)
              : null,
      confidence: CONFIDENCE_NAMES[s.confidence[t]],
    });
  }
  return { student: s.student, predictions };
}

function abortError(signal: AbortSignal): Error {
  const r: unknown = signal.reason;
  return r instanceof Error ? r : new Error('batch scoring cancelled');
}

/**
 * Score many students over many courses across worker threads. The model's arrays live in
 * SharedArrayBuffers, so each worker receives the model once per batch without a copy; each
 * chunk of results comes back as transferred buffers. Numbers are those of one-at-a-time
 * scoring (the same code runs). Without onStudent the results are collected in request order.
 */
export async function scoreBatch(
  model: Model,
  request: BatchRequest,
  options: BatchOptions = {},
): Promise<StudentScores[]> {
  const settings = resolveSettings(request.settings);
  const signals = [...(request.signals ?? SIGNALS)];
  const job: Job = {
    courseIdx: request.courses
      ? Int32Array.from(request.courses, (c) => model.courseIndex.get(c) ?? -1)
      : null,
    includeTaken: request.includeTaken ?? false,
    signals,
    settings,
  };
  const students = request.students;
  const total = students.length;
  const chunkSize = Math.max(1, options.chunkSize ?? 32);
  const collected: StudentScores[] = [];
  const emit =
    options.onStudent ??
    ((s: StudentScores) => {
      collected[s.position] = s;
    });
  const abort = options.signal;
  if (abort?.aborted) throw abortError(abort);
  const nChunks = Math.ceil(total / chunkSize);
  const nWorkers = Math.min(options.workers ?? availableParallelism(), nChunks);
  let done = 0;

  if (nWorkers <= 0) {
    const scorer = scorerFor(model);
    for (let first = 0; first < total; first += chunkSize) {
      if (abort?.aborted) throw abortError(abort);
      const c = scoreChunk(model, scorer, students, first, Math.min(chunkSize, total - first), job);
      unpack(c, students, signals, emit);
      done += c.offsets.length - 1;
      options.onProgress?.(done, total);
      // Let an abort or other work in.
      await new Promise((r) => setImmediate(r));
    }
    return options.onStudent ? [] : collected;
  }

  // Derived arrays (and the settings' model variant) are computed here once so the workers
  // share them.
  const prepared = prepare(model, settings);
  const path = options.workerPath ?? defaultWorkerPath();
  const workers: Worker[] = [];
  await new Promise<void>((resolve, reject) => {
    let next = 0;
    let finished = false;
    const stop = (err?: Error): void => {
      if (finished) return;
      finished = true;
      abort?.removeEventListener('abort', onAbort);
      for (const w of workers) void w.terminate();
      if (err) reject(err);
      else resolve();
    };
    const onAbort = (): void => stop(abortError(abort as AbortSignal));
    abort?.addEventListener('abort', onAbort);
    const feed = (w: Worker): void => {
      if (next >= total) return;
      const first = next;
      const count = Math.min(chunkSize, total - first);
      next += count;
      w.postMessage({ first, count });
    };
    for (let x = 0; x < nWorkers; x++) {
      const w = new Worker(path, { workerData: { model: prepared, students, job } });
      workers.push(w);
      w.on('message', (msg: { chunk?: PackedChunk; error?: string }) => {
        if (finished) return;
        if (msg.error || !msg.chunk) return stop(new Error(msg.error ?? 'worker sent nothing'));
        try {
          unpack(msg.chunk, students, signals, emit);
        } catch (e) {
          return stop(e instanceof Error ? e : new Error(String(e)));
        }
        done += msg.chunk.offsets.length - 1;
        options.onProgress?.(done, total);
        if (done >= total) return stop();
        feed(w);
      });
      w.on('error', (e) => stop(e));
      w.on('exit', (code) => {
        if (!finished && code !== 0) stop(new Error(`scoring worker exited with code ${code}`));
      });
      feed(w);
    }
  });
  return options.onStudent ? [] : collected;
}

export { chunkBuffers };
export type { Job as BatchJob };

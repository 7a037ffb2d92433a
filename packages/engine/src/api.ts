import { componentsOf, Model, modelFor, similarityView } from './model';
import {
  BASIS_NAMES,
  BASIS_NEIGHBOURS,
  CONFIDENCE_NAMES,
  DEFAULT_SCALES,
  fitOf,
  Scorer,
  sourceFor,
  targetSignal,
  untakenCourses,
} from './score';
import {
  Basis,
  CENTRINGS,
  CoursePrediction,
  DEFAULT_SETTINGS,
  MEAN_CENTRED_SETTINGS,
  SettingsInput,
  SIMILARITY_SOURCES,
  Kin,
  Settings,
  Signal,
  SIGNALS,
  SignalPrediction,
  StudentPrediction,
} from './types';

/**
 * Defaults filled in and every field checked; throws on a setting out of range. The original
 * method's `similaritySignal` (one signal's similarity for both) and `center` are understood:
 * given without the newer fields, they select the original method (MEAN_CENTRED_SETTINGS).
 */
export function resolveSettings(partial: SettingsInput = {}): Settings {
  const { similaritySignal, center, ...rest } = partial;
  const legacy = similaritySignal !== undefined || center !== undefined;
  const base = legacy ? MEAN_CENTRED_SETTINGS : DEFAULT_SETTINGS;
  const s: Settings = {
    ...base,
    ...(similaritySignal !== undefined
      ? { gradeSimilarity: similaritySignal, satisfactionSimilarity: similaritySignal }
      : {}),
    ...(center !== undefined ? { centring: center ? 'studentMean' : 'none' } : {}),
    ...rest,
    damping: {
      grade: {
        student: rest.damping?.grade?.student ?? base.damping.grade.student,
        course: rest.damping?.grade?.course ?? base.damping.grade.course,
      },
      satisfaction: {
        student: rest.damping?.satisfaction?.student ?? base.damping.satisfaction.student,
        course: rest.damping?.satisfaction?.course ?? base.damping.satisfaction.course,
      },
    },
  };
  const bad = (what: string): never => {
    throw new Error(`setting ${what} is out of range`);
  };
  if (similaritySignal !== undefined && !SIGNALS.includes(similaritySignal)) {
    bad(`similaritySignal ${similaritySignal}`);
  }
  if (!SIMILARITY_SOURCES.includes(s.gradeSimilarity)) bad(`gradeSimilarity ${s.gradeSimilarity}`);
  if (!SIMILARITY_SOURCES.includes(s.satisfactionSimilarity)) {
    bad(`satisfactionSimilarity ${s.satisfactionSimilarity}`);
  }
  if (s.similarity !== 'cosine' && s.similarity !== 'pearson') bad(`similarity ${s.similarity}`);
  if (!CENTRINGS.includes(s.centring)) bad(`centring ${s.centring}`);
  if (s.similarity === 'pearson') {
    // Pearson centres on each student's mean by definition (enrolment stays cosine).
    if (s.centring !== 'studentMean') bad(`centring ${s.centring} with pearson`);
  }
  for (const sig of SIGNALS) {
    const d = s.damping[sig];
    if (!(d.student >= 0 && Number.isFinite(d.student))) bad(`${sig} damping ${d.student}`);
    if (!(d.course >= 0 && Number.isFinite(d.course))) bad(`${sig} damping ${d.course}`);
  }
  if (!Number.isInteger(s.k) || s.k < 0) bad(`k ${s.k}`);
  if (!Number.isInteger(s.minNeighbours) || s.minNeighbours < 0)
    bad(`minNeighbours ${s.minNeighbours}`);
  if (Number.isNaN(s.minSimilarity)) bad(`minSimilarity ${s.minSimilarity}`);
  if (!Number.isInteger(s.significance) || s.significance < 0)
    bad(`significance ${s.significance}`);
  if (!(s.shrinkage >= 0 && Number.isFinite(s.shrinkage))) bad(`shrinkage ${s.shrinkage}`);
  if (!Number.isInteger(s.tieDigits) || s.tieDigits < 0 || s.tieDigits > 17) {
    bad(`tieDigits ${s.tieDigits}`);
  }
  if (!(s.alpha >= 0 && s.alpha <= 1)) bad(`alpha ${s.alpha}`);
  return s;
}

const scorers = new WeakMap<Model, Scorer>();
/** The model's scorer (scratch arrays), made on first use. */
export function scorerFor(model: Model): Scorer {
  let s = scorers.get(model);
  if (!s) {
    s = new Scorer(model);
    scorers.set(model, s);
  }
  return s;
}

function studentIdx(model: Model, student: string): number {
  return model.studentIndex.get(student) ?? -1;
}

/**
 * Kin of one student: everyone with similarity above minSimilarity, most similar first
 * (ties by the smaller student key), at most `limit`.
 */
export function similarities(
  model: Model,
  student: string,
  settings: SettingsInput = {},
  limit = Infinity,
  signal: Signal = 'grade',
): Kin[] {
  const st = resolveSettings(settings);
  const a = studentIdx(model, student);
  const ws = scorerFor(model).ws;
  ws.model = modelFor(model, st);
  ws.computeSource(a, st, sourceFor(st, signal), true);
  const rank = model.studentRank;
  const ids: number[] = [];
  if (st.minSimilarity < 0) {
    for (let i = 0; i < model.studentKeys.length; i++) {
      if (i !== a && ws.w[i] > st.minSimilarity) ids.push(i);
    }
  } else {
    for (let t = 0; t < ws.nTouched; t++) {
      const i = ws.touched[t];
      if (i !== a && ws.w[i] > st.minSimilarity) ids.push(i);
    }
  }
  ids.sort((x, y) => ws.w[y] - ws.w[x] || rank[x] - rank[y]);
  return ids.slice(0, Math.min(ids.length, limit)).map((i) => ({
    student: model.studentKeys[i],
    similarity: ws.w[i],
    overlap: ws.overlapOf(i),
  }));
}

function signalPrediction(scorer: Scorer, s: Signal, t: number): SignalPrediction {
  const o = scorer.out[s];
  const v = o.value[t];
  return {
    value: v === v ? v : null,
    neighbours: o.kin[t],
    basis: BASIS_NAMES[o.basis[t]],
    spread: o.basis[t] === BASIS_NEIGHBOURS ? o.spread[t] : null,
    confidence: CONFIDENCE_NAMES[o.confidence[t]],
    strength: o.strength[t],
  };
}

const FIT_FROM = ['both', 'grade', 'satisfaction'] as const;

/**
 * Both signals, fit and confidence for one student on the given courses (course keys; an
 * unknown course gets basis 'none'). Without courses: every course the student has no value
 * for in the similarity signal. An unknown student is a student with no records.
 */
export function predictStudent(
  model: Model,
  student: string,
  courses?: readonly string[],
  settings: SettingsInput = {},
): StudentPrediction {
  const st = resolveSettings(settings);
  const a = studentIdx(model, student);
  const targets = courses
    ? Int32Array.from(courses, (c) => model.courseIndex.get(c) ?? -1)
    : untakenCourses(model, a, targetSignal(st));
  const scorer = scorerFor(model);
  scorer.score(a, targets, st, SIGNALS);
  const gs = model.scales.grade ?? DEFAULT_SCALES.grade;
  const ss = model.scales.satisfaction ?? DEFAULT_SCALES.satisfaction;
  const predictions: CoursePrediction[] = [];
  for (let t = 0; t < targets.length; t++) {
    const grade = signalPrediction(scorer, 'grade', t);
    const satisfaction = signalPrediction(scorer, 'satisfaction', t);
    const [fit, from] = fitOf(
      scorer.out.grade.value[t],
      scorer.out.satisfaction.value[t],
      st.alpha,
      gs,
      ss,
    );
    const conf =
      from === 0
        ? Math.min(scorer.out.grade.confidence[t], scorer.out.satisfaction.confidence[t])
        : from === 1
          ? scorer.out.grade.confidence[t]
          : from === 2
            ? scorer.out.satisfaction.confidence[t]
            : 0;
    predictions.push({
      course: courses ? courses[t] : model.courseKeys[targets[t]],
      grade,
      satisfaction,
      fit: fit === fit ? fit : null,
      fitFrom: from >= 0 ? FIT_FROM[from] : null,
      confidence: CONFIDENCE_NAMES[conf],
    });
  }
  return { student, predictions };
}

/** One signal only (the command line's view): value, kin count and basis per course. */
export function predictSignal(
  model: Model,
  student: string,
  signal: Signal,
  courses?: readonly string[],
  settings: SettingsInput = {},
): { course: string; value: number | null; neighbours: number; basis: Basis }[] {
  const st = resolveSettings(settings);
  const a = studentIdx(model, student);
  const targets = courses
    ? Int32Array.from(courses, (c) => model.courseIndex.get(c) ?? -1)
    : untakenCourses(model, a, signal);
  const scorer = scorerFor(model);
  scorer.score(a, targets, st, [signal]);
  const o = scorer.out[signal];
  const res = [];
  for (let t = 0; t < targets.length; t++) {
    const v = o.value[t];
    res.push({
      course: courses ? courses[t] : model.courseKeys[targets[t]],
      value: v === v ? v : null,
      neighbours: o.kin[t],
      basis: BASIS_NAMES[o.basis[t]],
    });
  }
  return res;
}

/** Minimum contributing kin before their outcomes are shown (small-cell suppression). */
export const OUTCOME_DISCLOSURE_MIN = 5;

export interface Explanation {
  student: string;
  course: string;
  signal: Signal;
  value: number | null;
  basis: Basis;
  /** Contributing kin count. */
  neighbours: number;
  similarityRange: { min: number; max: number } | null;
  spread: number | null;
  /** Kin's values in the course; null when fewer than 5 contributed. */
  outcomes: { value: number; count: number }[] | null;
  /**
   * Every shared course's signed contribution to the kin's similarities (summed over the
   * kin), largest first; contributions can be negative and add up to similarityTotal.
   */
  sharedCourses: { course: string; contribution: number }[];
  /** The kin's summed w (kin strength when every w is positive). */
  similarityTotal: number;
  /**
   * The neighbourhood itself, for audits and tests: weight = w / sum|w|. It names other
   * students, so it is not for display.
   */
  kin: { student: string; similarity: number; weight: number; value: number; deviation: number }[];
}

/** Why one estimate is what it is (method.md, "Explanation of one prediction"). */
export function explain(
  model: Model,
  student: string,
  course: string,
  settings: SettingsInput = {},
  signal: Signal = 'grade',
): Explanation {
  const st = resolveSettings(settings);
  const a = studentIdx(model, student);
  const j = model.courseIndex.get(course) ?? -1;
  const scorer = scorerFor(model);
  scorer.score(a, [j], st, [signal]);
  const o = scorer.out[signal];
  const n = o.kin[0];
  const isKin = o.basis[0] === BASIS_NEIGHBOURS;
  // The model the estimate was scored on (its centres follow the settings' centring).
  const m = scorer.model;
  const d = m.signals[signal];
  const kin: Explanation['kin'] = [];
  const hood = n > 0 ? scorer.neighboursOf(signal, j, a, st).slice(0, n) : [];
  let den = 0;
  for (const x of hood) den += Math.abs(x.w);
  for (const x of hood) {
    kin.push({
      student: model.studentKeys[x.student],
      similarity: x.w,
      weight: den > 0 ? x.w / den : 1 / n,
      value: x.value,
      deviation: x.value - d.mean[x.student] - d.courseShift[j],
    });
  }
  let outcomes: Explanation['outcomes'] = null;
  if (n >= OUTCOME_DISCLOSURE_MIN) {
    const counts = new Map<number, number>();
    for (const x of kin) counts.set(x.value, (counts.get(x.value) ?? 0) + 1);
    outcomes = [...counts].sort((x, y) => x[0] - y[0]).map(([value, count]) => ({ value, count }));
  }
  const v = o.value[0];
  return {
    student,
    course,
    signal,
    value: v === v ? v : null,
    basis: BASIS_NAMES[o.basis[0]],
    neighbours: n,
    similarityRange: n
      ? {
          min: Math.min(...kin.map((x) => x.similarity)),
          max: Math.max(...kin.map((x) => x.similarity)),
        }
      : null,
    spread: isKin ? o.spread[0] : null,
    outcomes,
    sharedCourses:
      a >= 0
        ? sharedCourseTerms(
            m,
            a,
            kin.map((x) => model.studentIndex.get(x.student) ?? -1),
            st,
            signal,
          )
        : [],
    similarityTotal: hood.reduce((t, x) => t + x.w, 0),
    kin,
  };
}

/**
 * Per-course terms of one similarity (signed): each component's cosine terms, averaged over
 * the source's components, times the significance and shrinkage factors. They add up to
 * w(a, i) before rounding for ranking. `model` is the model the settings were scored on.
 */
export function similarityTerms(
  model: Model,
  a: number,
  i: number,
  settings: Settings,
  signal: Signal = 'grade',
): Map<number, number> {
  const comps = componentsOf(sourceFor(settings, signal));
  const terms = new Map<number, number>();
  let overlapMax = 0;
  for (const comp of comps) {
    const view = similarityView(model, comp, settings);
    const { data, f, rowX, norm } = view;
    const { rowPtr, rowCourse } = data;
    const own = new Map<number, number>();
    const pearson = settings.similarity === 'pearson' && comp !== 'enrolment';
    let p = rowPtr[a];
    let q = rowPtr[i];
    let da = 0;
    let di = 0;
    let overlap = 0;
    while (p < rowPtr[a + 1] && q < rowPtr[i + 1]) {
      const ca = rowCourse[p];
      const ci = rowCourse[q];
      if (ca < ci) p++;
      else if (ci < ca) q++;
      else {
        const fj = f[ca];
        overlap++;
        if (pearson) {
          own.set(ca, fj * rowX[p] * rowX[q]);
          da += fj * rowX[p] * rowX[p];
          di += fj * rowX[q] * rowX[q];
        } else own.set(ca, fj * rowX[p] * fj * rowX[q]);
        p++;
        q++;
      }
    }
    if (overlap > overlapMax) overlapMax = overlap;
    const den = pearson ? Math.sqrt(da * di) : norm[a] * norm[i];
    const scale = (den > 0 ? 1 / den : 0) / comps.length;
    for (const [c, t] of own) terms.set(c, (terms.get(c) ?? 0) + t * scale);
  }
  const g = settings.significance;
  const beta = settings.shrinkage;
  const factor =
    (g > 0 ? Math.min(overlapMax, g) / g : 1) * (beta > 0 ? overlapMax / (overlapMax + beta) : 1);
  if (factor !== 1) for (const [c, t] of terms) terms.set(c, t * factor);
  return terms;
}

/**
 * Every shared course's signed contribution to the kin's similarities, summed over the kin,
 * largest first; the contributions add up to the kin's summed w.
 */
function sharedCourseTerms(
  model: Model,
  a: number,
  kin: number[],
  settings: Settings,
  signal: Signal,
): { course: string; contribution: number }[] {
  const sum = new Map<number, number>();
  for (const i of kin) {
    for (const [c, t] of similarityTerms(model, a, i, settings, signal)) {
      sum.set(c, (sum.get(c) ?? 0) + t);
    }
  }
  return [...sum]
    .filter(([, t]) => t !== 0)
    .sort((x, y) => y[1] - x[1] || x[0] - y[0])
    .map(([c, t]) => ({ course: model.courseKeys[c], contribution: t }));
}

#!/usr/bin/env node
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { predictSignal, resolveSettings, similarities } from './api';
import { evaluate, EvaluationPlan } from './evaluate';
import { buildTable, modelFromTable, RecordError, RecordTable } from './model';
import { Scale, Settings, SettingsInput, Signal } from './types';

const USAGE = `usage: kinpath-engine <neighbours|predict|evaluate> --records FILE [options]
  neighbours --student ID... [--students-file F] [--limit 50]
  predict    (--student ID... | --students-file F) [--course C...] [--courses-file F]
  evaluate   (--holdout-term T | --folds K [--seed S])
  options: --signal grade|satisfaction  --similarity cosine|pearson  --iuf on|off
           --centring baseline|studentMean|none  --source grade|satisfaction|both|enrolment|satisfaction+enrolment
           --damping-student X  --damping-course X  --shrinkage X  --tie-digits N
           --k N  --min-neighbours N  --min-similarity X  --significance N  --scale MIN:MAX
           --center on|off: the original method (mean-centred, one signal's similarity, no shrinkage)
  Records CSV header: student,course,term,grade[,satisfaction]. Output: JSON Lines.`;

/** A problem with the command line or its files: one line on stderr, exit code 2. */
class UsageError extends Error {}

/** Split one CSV line (RFC 4180 quoting; a quoted field may not span lines here). */
function splitCsvLine(line: string, lineNo: number, file: string): string[] {
  const out: string[] = [];
  let i = 0;
  for (;;) {
    if (line[i] === '"') {
      let v = '';
      i++;
      for (;;) {
        const q = line.indexOf('"', i);
        if (q < 0) throw new UsageError(`${file}:${lineNo}: unterminated quoted field`);
        v += line.slice(i, q);
        if (line[q + 1] === '"') {
          v += '"';
          i = q + 2;
        } else {
          i = q + 1;
          break;
        }
      }
      out.push(v);
      if (i === line.length) return out;
      if (line[i] !== ',') throw new UsageError(`${file}:${lineNo}: text after a quoted field`);
      i++;
    } else {
      const c = line.indexOf(',', i);
      if (c < 0) {
        out.push(line.slice(i));
        return out;
      }
      out.push(line.slice(i, c));
      i = c + 1;
    }
  }
}

function readText(file: string): string {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    throw new UsageError(`cannot read ${file}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
  }
}

function parseValue(cell: string, what: string, file: string, lineNo: number): number | null {
  const t = cell.trim();
  if (t === '') return null;
  const v = Number(t);
  if (!Number.isFinite(v)) {
    throw new UsageError(`${file}:${lineNo}: ${what} ${JSON.stringify(cell)} is not a number`);
  }
  return v;
}

interface Records {
  table: RecordTable;
}

function readRecords(file: string, scales: Partial<Record<Signal, Scale>>): Records {
  const text = readText(file).replace(/^\uFEFF/, '');
  const lines = text.split(/\r?\n/);
  const header = splitCsvLine(lines[0] ?? '', 1, file).map((h) => h.trim().toLowerCase());
  const expect = ['student', 'course', 'term', 'grade'];
  const hasSat = header.length === 5 && header[4] === 'satisfaction';
  if (!(header.length === 4 || hasSat) || expect.some((h, x) => header[x] !== h)) {
    throw new UsageError(`${file}:1: header must be student,course,term,grade[,satisfaction]`);
  }
  const students: string[] = [];
  const courses: string[] = [];
  const terms: string[] = [];
  const grades: (number | null)[] = [];
  const sat: (number | null)[] = [];
  const lineOf: number[] = [];
  for (let x = 1; x < lines.length; x++) {
    const line = lines[x];
    if (line.trim() === '') continue;
    const cells = splitCsvLine(line, x + 1, file);
    if (cells.length !== header.length) {
      throw new UsageError(
        `${file}:${x + 1}: expected ${header.length} fields, found ${cells.length}`,
      );
    }
    students.push(cells[0]);
    courses.push(cells[1]);
    terms.push(cells[2]);
    grades.push(parseValue(cells[3], 'grade', file, x + 1));
    sat.push(hasSat ? parseValue(cells[4], 'satisfaction', file, x + 1) : null);
    lineOf.push(x + 1);
  }
  try {
    return {
      table: buildTable({ students, courses, terms, grades, satisfaction: sat }, { scales }),
    };
  } catch (e) {
    if (e instanceof RecordError) {
      throw new UsageError(
        `${file}:${lineOf[e.index]}: student ${JSON.stringify(e.student)}, course ${JSON.stringify(e.course)}: ${e.reason}`,
      );
    }
    throw e;
  }
}

function readList(file: string): string[] {
  return readText(file)
    .replace(/^\uFEFF/, '')
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter((l) => l !== '');
}

function int(v: string | undefined, name: string, min = 0): number | undefined {
  if (v === undefined) return undefined;
  if (!/^\d+$/.test(v) || Number(v) < min)
    throw new UsageError(
      `--${name} must be an integer of at least ${min}, got ${JSON.stringify(v)}`,
    );
  return Number(v);
}

function onOff(v: string | undefined, name: string): boolean | undefined {
  if (v === undefined) return undefined;
  if (v !== 'on' && v !== 'off')
    throw new UsageError(`--${name} must be on or off, got ${JSON.stringify(v)}`);
  return v === 'on';
}

function write(obj: unknown): void {
  process.stdout.write(JSON.stringify(obj) + '\n');
}

function main(argv: string[]): void {
  const command = argv[0];
  if (command === '--help' || command === '-h') {
    process.stdout.write(USAGE + '\n');
    return;
  }
  if (command !== 'neighbours' && command !== 'predict' && command !== 'evaluate') {
    throw new UsageError(
      command === undefined
        ? 'missing command (neighbours, predict or evaluate)'
        : `unknown command ${JSON.stringify(command)}`,
    );
  }
  let parsed;
  try {
    parsed = parseArgs({
      args: argv.slice(1),
      strict: true,
      allowPositionals: false,
      options: {
        records: { type: 'string' },
        student: { type: 'string', multiple: true },
        'students-file': { type: 'string' },
        course: { type: 'string', multiple: true },
        'courses-file': { type: 'string' },
        limit: { type: 'string' },
        'holdout-term': { type: 'string' },
        folds: { type: 'string' },
        seed: { type: 'string' },
        signal: { type: 'string' },
        similarity: { type: 'string' },
        iuf: { type: 'string' },
        center: { type: 'string' },
        centring: { type: 'string' },
        source: { type: 'string' },
        'damping-student': { type: 'string' },
        'damping-course': { type: 'string' },
        shrinkage: { type: 'string' },
        'tie-digits': { type: 'string' },
        k: { type: 'string' },
        'min-neighbours': { type: 'string' },
        'min-similarity': { type: 'string' },
        significance: { type: 'string' },
        scale: { type: 'string' },
      },
    });
  } catch (e) {
    throw new UsageError(e instanceof Error ? e.message.split('\n')[0] : String(e));
  }
  const o = parsed.values;
  const signal = (o.signal ?? 'grade') as Signal;
  if (signal !== 'grade' && signal !== 'satisfaction') {
    throw new UsageError(`--signal must be grade or satisfaction, got ${JSON.stringify(o.signal)}`);
  }
  if (o.similarity !== undefined && o.similarity !== 'cosine' && o.similarity !== 'pearson') {
    throw new UsageError(
      `--similarity must be cosine or pearson, got ${JSON.stringify(o.similarity)}`,
    );
  }
  let minSimilarity: number | undefined;
  if (o['min-similarity'] !== undefined) {
    minSimilarity = Number(o['min-similarity']);
    if (o['min-similarity'].trim() === '' || !Number.isFinite(minSimilarity)) {
      throw new UsageError(
        `--min-similarity must be a number, got ${JSON.stringify(o['min-similarity'])}`,
      );
    }
  }
  const scales: Partial<Record<Signal, Scale>> = {};
  if (o.scale !== undefined) {
    const m = /^(-?\d+(?:\.\d+)?):(-?\d+(?:\.\d+)?)$/.exec(o.scale);
    if (!m || !(Number(m[1]) < Number(m[2]))) {
      throw new UsageError(
        `--scale must be MIN:MAX with MIN < MAX, got ${JSON.stringify(o.scale)}`,
      );
    }
    scales[signal] = { min: Number(m[1]), max: Number(m[2]) };
  }
  const center = onOff(o.center, 'center');
  // --center selects the original method, where the predicted signal's similarity is its own.
  const partial: SettingsInput = center !== undefined ? { similaritySignal: signal, center } : {};
  if (o.centring !== undefined) partial.centring = o.centring as Settings['centring'];
  if (o.source !== undefined) {
    const src = o.source as Settings['gradeSimilarity'];
    if (signal === 'grade') partial.gradeSimilarity = src;
    else partial.satisfactionSimilarity = src;
  }
  const num = (name: 'damping-student' | 'damping-course' | 'shrinkage'): number | undefined => {
    const v = o[name];
    if (v === undefined) return undefined;
    const x = Number(v);
    if (v.trim() === '' || !Number.isFinite(x) || x < 0) {
      throw new UsageError(`--${name} must be a number of at least 0, got ${JSON.stringify(v)}`);
    }
    return x;
  };
  const ds = num('damping-student');
  const dc = num('damping-course');
  if (ds !== undefined || dc !== undefined) {
    partial.damping = {
      ...(partial.damping ?? {}),
      [signal]: { student: ds, course: dc },
    } as unknown as Settings['damping'];
  }
  const shrink = num('shrinkage');
  if (shrink !== undefined) partial.shrinkage = shrink;
  const td = int(o['tie-digits'], 'tie-digits');
  if (td !== undefined) partial.tieDigits = td;
  if (o.similarity) partial.similarity = o.similarity as Settings['similarity'];
  const iuf = onOff(o.iuf, 'iuf');
  if (iuf !== undefined) partial.iuf = iuf;
  const k = int(o.k, 'k');
  if (k !== undefined) partial.k = k;
  const mn = int(o['min-neighbours'], 'min-neighbours');
  if (mn !== undefined) partial.minNeighbours = mn;
  if (minSimilarity !== undefined) partial.minSimilarity = minSimilarity;
  const g = int(o.significance, 'significance');
  if (g !== undefined) partial.significance = g;
  const settings = resolveSettings(partial);

  const only = (allowed: string[]): void => {
    for (const name of [
      'student',
      'students-file',
      'course',
      'courses-file',
      'limit',
      'holdout-term',
      'folds',
      'seed',
    ]) {
      if ((o as Record<string, unknown>)[name] !== undefined && !allowed.includes(name)) {
        throw new UsageError(`--${name} does not apply to ${command}`);
      }
    }
  };
  if (!o.records) throw new UsageError('--records FILE is required');

  if (command === 'evaluate') {
    only(['holdout-term', 'folds', 'seed']);
    if ((o['holdout-term'] === undefined) === (o.folds === undefined)) {
      throw new UsageError('evaluate needs exactly one of --holdout-term T or --folds K');
    }
    if (o.seed !== undefined && o.folds === undefined)
      throw new UsageError('--seed applies to --folds only');
    const { table } = readRecords(o.records, scales);
    const term = o['holdout-term'];
    const plan: EvaluationPlan =
      term !== undefined
        ? { holdoutTerm: term }
        : { folds: int(o.folds, 'folds', 2) as number, seed: int(o.seed, 'seed') ?? 1 };
    if (term !== undefined && !table.termKeys.includes(term)) {
      throw new UsageError(`--holdout-term ${JSON.stringify(term)} has no records`);
    }
    const report = evaluate(table, plan, [settings], { signals: [signal] });
    const r = report.signals[signal];
    write({
      signal,
      plan,
      configurations: r?.configurations ?? [],
      baselines: r?.baselines ?? null,
    });
    return;
  }

  const students = [...(o.student ?? [])];
  if (command === 'neighbours') {
    only(['student', 'students-file', 'limit']);
  } else {
    only(['student', 'students-file', 'course', 'courses-file']);
  }
  if (o['students-file']) students.push(...readList(o['students-file']));
  if (students.length === 0)
    throw new UsageError(`${command} needs --student ID or --students-file F`);
  const courses = [...(o.course ?? [])];
  if (o['courses-file']) courses.push(...readList(o['courses-file']));
  const limit = int(o.limit, 'limit') ?? 50;
  const { table } = readRecords(o.records, scales);
  const model = modelFromTable(table);
  for (const student of students) {
    if (command === 'neighbours') {
      const kin = similarities(model, student, settings, limit, signal);
      write({ student, neighbours: kin });
    } else {
      const predictions = predictSignal(
        model,
        student,
        signal,
        courses.length ? courses : undefined,
        settings,
      );
      write({ student, predictions });
    }
  }
}

try {
  main(process.argv.slice(2));
} catch (e) {
  if (e instanceof UsageError) {
    process.stderr.write(`kinpath-engine: ${e.message}\n`);
    process.exitCode = 2;
  } else {
    process.stderr.write(`kinpath-engine: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exitCode = 1;
  }
}

#!/usr/bin/env node
// Writes Halden Reach University's invented term data as the four import kinds
// of docs/data.md (catalogue, offerings, students, records), from a fixed seed.
//
// Students have a general ability and their own strengths across four kinds of
// work (quantitative, writing, laboratory, creative); courses mix those kinds.
// So students of similar histories really do fare alike, which is what the
// advising estimates rest on.
//
//   node tools/demo/generate.mjs --out DIR [--students 2000] [--seed 2026]
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { CORE, DEPARTMENTS, PROGRAMMES, TITLES } from './halden.mjs';

const LETTERS = [
  ['A', 4.0],
  ['A-', 3.7],
  ['B+', 3.3],
  ['B', 3.0],
  ['B-', 2.7],
  ['C+', 2.3],
  ['C', 2.0],
  ['C-', 1.7],
  ['D+', 1.3],
  ['D', 1.0],
  ['D-', 0.7],
  ['F', 0.0],
];
const FIRST_YEAR = 2019;
const LAST_TERM = '2026-FA';
export const NEXT_TERM = '2027-SP';

function mulberry32(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function makeRandom(seed) {
  const uniform = mulberry32(seed);
  const normal = (mean = 0, sd = 1) => {
    const u = Math.max(uniform(), 1e-12);
    return mean + sd * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform());
  };
  const pick = (items) => items[Math.floor(uniform() * items.length)];
  return { uniform, normal, pick };
}

const dot = (a, b) => a.reduce((s, x, i) => s + x * b[i], 0);
const norm = (a) => Math.sqrt(dot(a, a)) || 1;

function letterFor(points) {
  let best = LETTERS[0];
  for (const entry of LETTERS)
    if (Math.abs(entry[1] - points) < Math.abs(best[1] - points)) best = entry;
  return best;
}

function termsBetween(firstYear, last) {
  const terms = [];
  for (let year = firstYear; ; year++) {
    for (const season of ['SP', 'SU', 'FA']) {
      const term = `${year}-${season}`;
      if (year === firstYear && season !== 'FA') continue;
      terms.push(term);
      if (term === last) return terms;
    }
  }
}

function buildCatalogue(rand) {
  const courses = CORE.map((c) => ({
    ...c,
    department: 'HRU',
    level: 1000,
    credits: 3,
    elective: false,
    prerequisites: '',
    difficulty: 0,
  }));
  for (const dept of DEPARTMENTS) {
    const titles = TITLES[dept.code];
    const byLevel = { 1: [], 2: [], 3: [], 4: [] };
    titles.forEach((title, i) => {
      const levelDigit = i < 2 ? 1 : i < 5 ? 2 : i < 9 ? 3 : 4;
      const position = byLevel[levelDigit].length + 1;
      const code = `${dept.code} ${levelDigit}${position}10`;
      const style = dept.style.map((x) => Math.max(0, x + rand.normal(0, 0.25)));
      const lab = ['PHY', 'CHM', 'BIO'].includes(dept.code) && levelDigit > 1;
      const course = {
        code,
        title,
        department: dept.code,
        level: levelDigit * 1000,
        credits: lab ? 4 : 3,
        elective: true,
        style,
        difficulty: rand.normal(0.05 * levelDigit, 0.3),
        prerequisites: '',
      };
      const below = byLevel[levelDigit - 1] ?? [];
      if (levelDigit === 2) course.prerequisites = byLevel[1][0].code;
      if (levelDigit >= 3 && below.length) {
        const first = rand.pick(below).code;
        const second = rand.pick(below).code;
        course.prerequisites = first === second ? first : `${first} OR ${second}`;
        if (dept.code === 'PHY' && levelDigit === 3)
          course.prerequisites = `(${course.prerequisites}) AND MTH 1110`;
      }
      byLevel[levelDigit].push(course);
      courses.push(course);
    });
  }
  return courses;
}

function prerequisitesMet(expression, passed) {
  if (!expression) return true;
  // Demo expressions are simple: OR binds inside parentheses, AND joins groups.
  return expression.split(' AND ').every((group) =>
    group
      .replace(/[()]/g, '')
      .split(' OR ')
      .some((code) => passed.has(code.trim())),
  );
}

export function generate({ students: studentCount = 2000, seed = 2026 } = {}) {
  const rand = makeRandom(seed);
  const courses = buildCatalogue(rand);
  const byCode = new Map(courses.map((c) => [c.code, c]));
  const terms = termsBetween(FIRST_YEAR, LAST_TERM);
  const allTerms = [...terms, NEXT_TERM];

  // Offerings: introductory courses run every autumn and spring; others most terms; a few in summer.
  const offered = new Map();
  for (const term of allTerms) {
    const summer = term.endsWith('-SU');
    const set = new Set();
    for (const c of courses) {
      const chance = summer ? (c.level === 1000 ? 0.5 : 0.12) : c.level === 1000 ? 1 : 0.72;
      if (rand.uniform() < chance) set.add(c.code);
    }
    offered.set(term, set);
  }

  const cohorts = [];
  for (let year = FIRST_YEAR; year <= 2026; year++) cohorts.push(`${year}-FA`);
  const students = [];
  const records = [];
  const enrolment = new Map(); // term|code -> count

  for (let n = 0; n < studentCount; n++) {
    const entryTerm = cohorts[n % cohorts.length];
    const programme = PROGRAMMES[Math.floor(rand.uniform() * PROGRAMMES.length)];
    const home = DEPARTMENTS.find((d) => d.code === programme.home);
    const ability = rand.normal(0, 0.45);
    const aptitude = home.style.map((x) => 0.6 * x + rand.normal(0, 0.45));
    const interest = home.style.map((x) => 0.7 * x + rand.normal(0, 0.35));
    const id = `HR${String(1000000 + n * 37 + Math.floor(rand.uniform() * 37)).padStart(7, '0')}`;
    const leaves = rand.uniform();
    const studyTerms = terms.slice(terms.indexOf(entryTerm)).filter((t) => !t.endsWith('-SU'));
    const stopAfter = leaves < 0.06 ? 2 + Math.floor(rand.uniform() * 3) : 8;
    const taken = studyTerms.slice(0, stopAfter);
    const passed = new Set();
    const attempts = new Map();

    taken.forEach((term, index) => {
      const year = Math.floor(index / 2) + 1;
      const plan = [];
      if (index === 0) plan.push('HRU 1010', `${home.code} 1110`);
      if (index === 1) plan.push('HRU 1020', `${home.code} 1210`);
      const load = 4 + (rand.uniform() < 0.4 ? 1 : 0);
      const pool = courses.filter(
        (c) =>
          offered.get(term).has(c.code) &&
          c.elective &&
          !passed.has(c.code) &&
          !plan.includes(c.code) &&
          prerequisitesMet(c.prerequisites, passed),
      );
      const weights = pool.map((c) => {
        const related =
          c.department === home.code ? 1.2 : programme.near.includes(c.department) ? 0.6 : 0;
        const levelFit = -0.9 * Math.abs(c.level / 1000 - Math.min(4, year + 0.5));
        return Math.exp((1.6 * dot(interest, c.style)) / norm(c.style) + related + levelFit);
      });
      while (plan.length < load && pool.length) {
        const total = weights.reduce((s, w) => s + w, 0);
        let r = rand.uniform() * total;
        let i = 0;
        while (i < weights.length - 1 && r > weights[i]) r -= weights[i++];
        plan.push(pool[i].code);
        pool.splice(i, 1);
        weights.splice(i, 1);
      }
      for (const code of plan) {
        const course = byCode.get(code);
        const key = `${term}|${code}`;
        enrolment.set(key, (enrolment.get(key) ?? 0) + 1);
        const fitToStrengths = dot(aptitude, course.style) / norm(course.style);
        const raw =
          2.9 + ability + 0.75 * fitToStrengths - course.difficulty + rand.normal(0, 0.33);
        const [letter, points] = letterFor(Math.min(4, Math.max(0, raw)));
        const mark = rand.uniform();
        const grade = mark < 0.025 ? 'W' : mark < 0.03 ? 'I' : letter;
        const liking =
          3.1 +
          1.1 * (dot(interest, course.style) / norm(course.style)) -
          0.4 +
          0.35 * (points - 2.9);
        const satisfaction =
          grade === 'W' || rand.uniform() < 0.14
            ? ''
            : String(Math.min(5, Math.max(1, Math.round(liking + rand.normal(0, 0.55)))));
        records.push([id, term, code, grade, satisfaction, String(course.credits)]);
        attempts.set(code, grade);
        if (grade !== 'W' && grade !== 'I' && points >= 0.7) passed.add(code);
      }
    });

    const finished = taken.length >= 8;
    const status =
      stopAfter < 8
        ? 'withdrawn'
        : finished
          ? 'graduated'
          : rand.uniform() < 0.03
            ? 'on_leave'
            : 'active';
    students.push([id, programme.name, entryTerm, status]);
  }

  const offerings = [];
  for (const term of allTerms) {
    for (const code of [...offered.get(term)].sort()) {
      const taken = enrolment.get(`${term}|${code}`) ?? 0;
      // Seats follow demand loosely: some electives are tight, some have room to spare.
      const expected = term === NEXT_TERM ? 25 : taken;
      const capacity = Math.max(15, Math.round((expected * (0.75 + rand.uniform() * 0.8)) / 5) * 5);
      const sections = Math.max(1, Math.ceil(capacity / 40));
      offerings.push([term, code, String(sections), String(capacity)]);
    }
  }

  const catalogue = courses.map((c) => [
    c.code,
    c.title,
    c.department,
    String(c.credits),
    String(c.level),
    c.elective ? 'yes' : 'no',
    c.prerequisites,
    `${c.title} at Halden Reach University.`,
  ]);
  return { catalogue, offerings, students, records, nextTerm: NEXT_TERM };
}

function csv(header, rows) {
  const cell = (v) => (/[",;\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\n') + '\n';
}

export function writeDemo(outDir, options) {
  const data = generate(options);
  mkdirSync(outDir, { recursive: true });
  writeFileSync(
    join(outDir, 'catalogue.csv'),
    csv(
      [
        'course_code',
        'title',
        'department',
        'credits',
        'level',
        'elective',
        'prerequisites',
        'description',
      ],
      data.catalogue,
    ),
  );
  writeFileSync(
    join(outDir, 'offerings.csv'),
    csv(['term', 'course_code', 'sections', 'capacity'], data.offerings),
  );
  writeFileSync(
    join(outDir, 'students.csv'),
    csv(['student_id', 'program', 'entry_term', 'status'], data.students),
  );
  writeFileSync(
    join(outDir, 'records.csv'),
    csv(
      ['student_id', 'term', 'course_code', 'grade', 'satisfaction', 'credits_attempted'],
      data.records,
    ),
  );
  return data;
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const args = process.argv.slice(2);
  const option = (name, fallback) => {
    const i = args.indexOf(name);
    return i >= 0 ? args[i + 1] : fallback;
  };
  const out = option('--out', '.data/demo');
  const data = writeDemo(out, {
    students: Number(option('--students', 2000)),
    seed: Number(option('--seed', 2026)),
  });
  console.log(
    `kinpath: wrote Halden Reach demo data to ${out}: ${data.catalogue.length} courses, ${data.offerings.length} offerings, ${data.students.length} students, ${data.records.length} records.`,
  );
}

#!/usr/bin/env node
// Benchmark at university scale (run `npm run build` first): `npm run bench -w @kinpath/engine`.
// Prints figures; never part of the test run. Options: --students N (default 200000).
'use strict';
const { spawnSync } = require('node:child_process');
const { mkdirSync, writeFileSync, createWriteStream, existsSync } = require('node:fs');
const { join } = require('node:path');
const { availableParallelism } = require('node:os');
const engine = require('../dist');
const { scorerFor } = require('../dist/api');
const { SimilarityWorkspace } = require('../dist/similarity');

const arg = (name, dflt) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : dflt;
};
const S = arg('students', 200_000);
const ACTIVE = arg('active', 40_000);
const CLI_STUDENTS = arg('cli-students', 50_000);
const scales = { grade: { min: 0, max: 4 }, satisfaction: { min: 1, max: 5 } };
const ms = (t0) => Number(process.hrtime.bigint() - t0) / 1e6;
const pct = (xs, p) => xs[Math.min(xs.length - 1, Math.floor((p / 100) * xs.length))];
const out = (label, value) => console.log(`${label.padEnd(44)} ${value}`);

async function main() {
  out('machine', `${availableParallelism()} cores, Node ${process.version}`);
  let t0 = process.hrtime.bigint();
  let uni = engine.generateUniversity({ students: S });
  out(
    'generate (fixed seed)',
    `${S} students, ${uni.courseKeys.length} courses, ${uni.students.length} records, ${(ms(t0) / 1000).toFixed(1)} s`,
  );
  t0 = process.hrtime.bigint();
  const model = engine.buildModel(uni, { scales, compareTerms: engine.registrarTermOrder });
  out('build model from arrays', `${(ms(t0) / 1000).toFixed(2)} s`);
  const electives = uni.electives;
  const keys = uni.studentKeys;
  uni = null; // Let the record arrays go; the model keeps what it needs.
  if (global.gc) global.gc();

  // Per student, every elective not yet taken, both signals, fit and confidence.
  const settings = engine.resolveSettings({});
  t0 = process.hrtime.bigint();
  engine.predictStudent(model, keys[0], undefined, settings); // Derived arrays are made on first use.
  out('first prediction (derived arrays)', `${ms(t0).toFixed(0)} ms`);
  const times = [];
  const cpuTimes = [];
  const stats = { candidates: 0, walked: 0, scanned: 0 };
  const scorer = scorerFor(model);
  for (let x = 0; x < 300; x++) {
    const s = keys[(x * 7919) % keys.length];
    const t = process.hrtime.bigint();
    const c = process.cpuUsage();
    engine.predictStudent(model, s, undefined, settings);
    const cpu = process.cpuUsage(c);
    if (x >= 20) {
      times.push(ms(t));
      cpuTimes.push((cpu.user + cpu.system) / 1000);
    }
    for (const k in stats) stats[k] += scorer.stats[k];
  }
  times.sort((a, b) => a - b);
  cpuTimes.sort((a, b) => a - b);
  out(
    'one student x every elective (280 students)',
    `p50 ${pct(times, 50).toFixed(1)} ms, p95 ${pct(times, 95).toFixed(1)} ms wall; CPU p50 ${pct(cpuTimes, 50).toFixed(1)} ms, p95 ${pct(cpuTimes, 95).toFixed(1)} ms`,
  );
  out(
    '  work per student (mean)',
    `${Math.round(stats.candidates / 300)} kin candidates, ${Math.round(stats.walked / 300)} entries walked, ${Math.round(stats.scanned / 300)} scanned`,
  );
  // The similarity step alone (w to every student), the floor under any neighbourhood choice.
  const ws = new SimilarityWorkspace(model);
  const simCpu = [];
  for (let x = 0; x < 300; x++) {
    const c = process.cpuUsage();
    ws.compute(model.studentIndex.get(keys[(x * 7919) % keys.length]), settings, false);
    const cpu = process.cpuUsage(c);
    simCpu.push((cpu.user + cpu.system) / 1000);
  }
  simCpu.sort((a, b) => a - b);
  out(
    '  of which similarities to everyone',
    `CPU p50 ${pct(simCpu, 50).toFixed(1)} ms, p95 ${pct(simCpu, 95).toFixed(1)} ms`,
  );

  // Batch: 40,000 active students x all electives, on every core.
  const active = Array.from({ length: ACTIVE }, (_, i) => keys[(i * 5) % keys.length]);
  let cells = 0;
  let neighbourCells = 0;
  t0 = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  await engine.scoreBatch(
    model,
    { students: active, courses: electives, settings },
    {
      chunkSize: 64,
      onStudent: (r) => {
        cells += r.courses.length;
        for (let t = 0; t < r.grade.basis.length; t++) if (r.grade.basis[t] === 2) neighbourCells++;
      },
    },
  );
  const batchMs = ms(t0);
  const batchCpu = process.cpuUsage(cpu0);
  out(
    `batch ${ACTIVE} students x all electives`,
    `${(batchMs / 1000).toFixed(1)} s on ${availableParallelism()} workers, ${Math.round(cells / (batchMs / 1000)).toLocaleString('en')} predictions/s (${cells.toLocaleString('en')} cells, ${((100 * neighbourCells) / cells).toFixed(1)}% from kin)`,
  );
  out(
    '  CPU time of the batch (all threads)',
    `${((batchCpu.user + batchCpu.system) / 1e6).toFixed(1)} s, ${((batchCpu.user + batchCpu.system) / 1000 / ACTIVE).toFixed(1)} ms per student`,
  );
  out('peak RSS (whole process)', `${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);

  // The command line on a 2-million-record file: 200 students x 50 courses, whole process.
  const dir = join(__dirname, '..', '.bench');
  mkdirSync(dir, { recursive: true });
  // The default size is the 2-million-record file; other sizes get their own file.
  const csv = join(dir, CLI_STUDENTS === 50_000 ? 'records-2m.csv' : `records-${CLI_STUDENTS}.csv`);
  const small = engine.generateUniversity({ students: CLI_STUDENTS, seed: 7 });
  if (!existsSync(csv)) {
    const w = createWriteStream(csv);
    w.write('student,course,term,grade,satisfaction\n');
    let buf = '';
    for (let r = 0; r < small.students.length; r++) {
      const g = small.grades[r];
      const s = small.satisfaction[r];
      buf += `${small.students[r]},${small.courses[r]},${small.terms[r]},${g === g ? g : ''},${s === s ? s : ''}\n`;
      if (buf.length > 1 << 20) {
        if (!w.write(buf)) await new Promise((r) => w.once('drain', r));
        buf = '';
      }
    }
    w.write(buf);
    await new Promise((r) => w.end(r));
  }
  writeFileSync(
    join(dir, 'students-200.txt'),
    small.studentKeys
      .filter((_, i) => i % 250 === 0)
      .slice(0, 200)
      .join('\n') + '\n',
  );
  writeFileSync(
    join(dir, 'courses-50.txt'),
    small.electives
      .filter((_, i) => i % 59 === 0)
      .slice(0, 50)
      .join('\n') + '\n',
  );
  const args = [
    join(__dirname, '..', 'dist', 'cli.js'),
    'predict',
    '--records',
    csv,
    '--students-file',
    join(dir, 'students-200.txt'),
    '--courses-file',
    join(dir, 'courses-50.txt'),
  ];
  t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { stdio: ['ignore', 'ignore', 'inherit'] });
  out(
    `CLI predict, 200 x 50 on ${small.students.length.toLocaleString('en')} records`,
    `${(ms(t0) / 1000).toFixed(2)} s whole process (exit ${r.status})`,
  );
  out(
    '  command',
    `node packages/engine/dist/cli.js predict --records packages/engine/.bench/records-2m.csv --students-file packages/engine/.bench/students-200.txt --courses-file packages/engine/.bench/courses-50.txt`,
  );
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});

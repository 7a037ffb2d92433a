#!/usr/bin/env node
// Copies the fonts Kinpath ships into top-level fonts/, with their licences, so the built
// page never fetches a font from another host. Run with `npm run fonts`; the copies are committed.
import { copyFile, mkdir, readFile, writeFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
// Resolve from the frontend workspace, where the @fontsource packages are declared.
const require = createRequire(join(root, 'frontend', 'package.json'));

const FAMILIES = [
  {
    pkg: '@fontsource/atkinson-hyperlegible',
    dir: 'atkinson-hyperlegible',
    name: 'Atkinson Hyperlegible',
    // Latin subset only: the interface is in English; 700 for headings and emphasis.
    files: [
      'atkinson-hyperlegible-latin-400-normal.woff2',
      'atkinson-hyperlegible-latin-700-normal.woff2',
    ],
  },
];

const packageDir = (pkg) => dirname(require.resolve(`${pkg}/package.json`));

const fontsDir = join(root, 'fonts');
const readmeRows = [];

for (const family of FAMILIES) {
  const from = packageDir(family.pkg);
  const { version } = JSON.parse(await readFile(join(from, 'package.json'), 'utf8'));
  const to = join(fontsDir, family.dir);
  await mkdir(to, { recursive: true });
  for (const file of family.files) {
    await copyFile(join(from, 'files', file), join(to, file));
  }
  await copyFile(join(from, 'LICENSE'), join(to, 'OFL.txt'));
  readmeRows.push(
    `| ${family.name} | \`${family.dir}/\` | ${family.files.map((f) => `\`${f}\``).join(', ')} | \`${family.pkg}\` ${version} | SIL Open Font License 1.1 (\`${family.dir}/OFL.txt\`) |`,
  );
  console.log(
    `fonts: ${family.name} ${version} -> fonts/${family.dir}/ (${family.files.length} files + OFL.txt)`,
  );
}

const readme = `# Fonts

Kinpath ships its typeface inside the application: the built page loads fonts
only from its own origin, never from a font host.

| family | folder | files | copied from | licence |
|---|---|---|---|---|
${readmeRows.join('\n')}

Why Atkinson Hyperlegible: it was drawn for readers with low vision, keeps
easily confused characters apart (1 l I, 0 O, 5 S), and carries tabular
figures, so columns of grades, counts and fit scores line up when the
interface turns on \`font-variant-numeric: tabular-nums\`. Only the Latin
subset at weights 400 and 700 is shipped; the interface is in English.

The files are loaded by \`frontend/src/styles/fonts.css\` through \`@font-face\`;
Vite copies them into \`frontend/dist/assets/\` with a content hash.

These files are generated: run \`npm run fonts\` (\`tools/fonts.mjs\`) after
upgrading the \`@fontsource\` packages, and commit the result. Each licence
file travels with its font, as the Open Font License asks.
`;
await writeFile(join(fontsDir, 'README.md'), readme);

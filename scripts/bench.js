#!/usr/bin/env node
// npm run bench [-- SECTION...]: speed figures with units. Never part of npm test.
// Sections live in scripts/bench/*.js and export `title` and `run(args)`.
import { readdirSync } from 'node:fs';

const wanted = process.argv.slice(2).filter((a) => !a.startsWith('--'));
const flags = process.argv.slice(2).filter((a) => a.startsWith('--'));
const files = readdirSync(new URL('./bench/', import.meta.url)).filter((f) => f.endsWith('.js')).sort();
for (const file of files) {
  const name = file.replace(/\.js$/, '');
  if (wanted.length > 0 && !wanted.includes(name)) continue;
  const section = await import(`./bench/${file}`);
  if (section.onlyWith && !flags.includes(section.onlyWith)) continue;
  // Long sections (e.g. accuracy, which trains cascades) run only when asked for by name.
  if (section.onlyWhenNamed && !wanted.includes(name)) continue;
  console.log(`\n== ${section.title} (${name})`);
  await section.run(flags);
}

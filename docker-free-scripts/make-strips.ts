// Writes the invented example pleth strips to public/strips/ (node --import tsx docker-free-scripts/make-strips.ts).
import { writeFileSync } from 'node:fs';
import { EXAMPLE_STRIPS, exampleStripCsv } from '../src/lib/pleth-strips/strip-synth.ts';

for (const spec of EXAMPLE_STRIPS) {
  const path = new URL(`../public/strips/${spec.name}.csv`, import.meta.url);
  writeFileSync(path, exampleStripCsv(spec));
  console.log(`wrote public/strips/${spec.name}.csv (${spec.title})`);
}

// Regenerates docs/OPTIONS.md from the option declarations (the one source of truth for options).
import { writeFileSync } from 'node:fs';
import { formatOptionsMarkdown } from '../dist/core/pipeline/config.js';
import { CONFIG_DECLARATIONS } from '../dist/core/pipeline/declarations.js';

const HEADER = '# xylemap options reference\n\nGenerated from the option declarations by `npm run docs` (`xylemap config --print-docs`); do not edit by hand.\n\n';
writeFileSync(new URL('../docs/OPTIONS.md', import.meta.url), HEADER + formatOptionsMarkdown(CONFIG_DECLARATIONS));

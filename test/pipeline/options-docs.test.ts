import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatOptionsMarkdown } from '../../core/pipeline/config.js';
import { CONFIG_DECLARATIONS } from '../../core/pipeline/declarations.js';

const HEADER = '# xylemap options reference\n\nGenerated from the option declarations by `npm run docs` (`xylemap config --print-docs`); do not edit by hand.\n\n';

describe('docs/OPTIONS.md', () => {
  it('equals the reference generated from the option declarations (run `npm run docs` after changing an option)', () => {
    const committed = readFileSync(new URL('../../docs/OPTIONS.md', import.meta.url), 'utf8');
    expect(committed).toBe(HEADER + formatOptionsMarkdown(CONFIG_DECLARATIONS));
  });
});

// npm links the bin only for dependencies; make the built entry executable for direct use too.
import { chmodSync, existsSync } from 'node:fs';
const entry = new URL('../dist/cli/main.js', import.meta.url);
if (existsSync(entry)) chmodSync(entry, 0o755);

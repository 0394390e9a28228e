/**
 * The namespaced `--<stage>.<key>` flags now live in `cli/shared/declared-flags.ts` (one conversion
 * rule for every command). Kept so `reconstruct.ts` keeps working until it imports from there.
 */
export { addStageFlags, stageFlagValues } from '../shared/declared-flags.js';

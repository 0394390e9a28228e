import { defineOptions } from '../options/declare.js';

/**
 * Options of the stand-level statistics (`batch:` block of the YAML configuration; the other
 * blocks go to each tree's pipeline).
 */
export const batchOptions = defineOptions('batch', 'stand table, species comparison and inventory upscaling across trees', {
  confidence: {
    type: 'number',
    default: 0.95,
    unit: '1',
    min: 0.5,
    max: 0.999,
    help: 'confidence level of every interval in stand.json / species.csv / plots.csv',
  },
  permutation_replicates: {
    type: 'number',
    default: 9999,
    unit: '1',
    min: 99,
    max: 1_000_000,
    integer: true,
    help: 'random relabellings per pairwise species permutation test',
  },
  bootstrap_replicates: {
    type: 'number',
    default: 2000,
    unit: '1',
    min: 99,
    max: 1_000_000,
    integer: true,
    help: 'bootstrap replicates for pairwise difference intervals and the upscaling interval',
  },
  seed: {
    type: 'number',
    default: 1,
    unit: '1',
    min: 0,
    max: 4294967295,
    integer: true,
    help: 'seed of the permutation test and bootstraps (same seed, same numbers)',
  },
  min_trees_per_fit: {
    type: 'number',
    default: 3,
    unit: '1',
    min: 3,
    max: 1000,
    integer: true,
    help: 'fewest trees of a species for its own K–DBH fit; species with fewer use the pooled fit',
  },
  fit_dbh_source: {
    type: 'enum',
    values: ['scan', 'field', 'field_if_given'] as const,
    default: 'scan',
    help: 'DBH used in the K–DBH fit: from the reconstruction, the manifest field_dbh_m, or field when given else scan',
  },
  upscale_bias_correction: {
    type: 'boolean',
    default: true,
    help: 'multiply K predicted from the log-log fit by exp(s²/2) so plot sums estimate the mean, not the median (Sprugel 1983)',
  },
  upscale_interval: {
    type: 'enum',
    values: ['prediction', 'fit'] as const,
    default: 'prediction',
    help: 'plot interval: prediction (fit uncertainty plus each stem\'s scatter about the fit) or fit (fit uncertainty only)',
  },
  max_plausible_dbh_m: {
    type: 'number',
    default: 5,
    unit: 'm',
    min: 0.5,
    max: 20,
    help: 'a DBH above this (manifest or inventory) is taken as a unit mistake (cm given as m) and rejected',
  },
});

export type BatchOptionValues = ReturnType<typeof batchOptions.defaults>;

import { defineOptions } from '../options/declare.js';

/** Options of the HTML report. */
export const reportOptions = defineOptions('report', 'The self-contained report.html: 3D network view, plots and key figures.', {
  title: { type: 'string', default: '', help: 'title shown at the top of the report; empty = the input file name' },
  colour_by: {
    type: 'enum',
    values: ['branch_order', 'radius', 'reliability', 'conduit_diameter', 'water_potential', 'plc'] as const,
    default: 'branch_order',
    help: 'what the 3D view colours segments by when the report opens',
  },
  histogram_bins: {
    type: 'number',
    default: 24,
    unit: '1',
    min: 4,
    max: 200,
    integer: true,
    help: 'number of bins of the per-furcation exponent histogram',
  },
  min_draw_radius_px: {
    type: 'number',
    default: 0.6,
    unit: 'px',
    min: 0,
    max: 10,
    help: 'thinnest drawn radius in the 3D view, so fine twigs stay visible (drawing only, not data)',
  },
});

import { defineOptions, type OptionValues } from '../options/declare.js';

/**
 * Options of the cleaning stage: thinning, outliers, ground, stem base, and the neighbourhood
 * graph used to keep only the tree connected to the stem base. Declared once; CLI flags and the
 * YAML `clean:` block are built from this.
 */
export const cleanOptions = defineOptions('clean', 'Thin the cloud, remove outliers and ground, find the stem base and keep the tree connected to it.', {
  voxel_size_m: { type: 'number', default: 0.015, unit: 'm', min: 0.002, max: 0.5, help: 'edge of the thinning voxels; the graph is built on one point per voxel (the centroid)' },
  outlier_neighbours: { type: 'number', default: 8, unit: '1', min: 2, max: 64, integer: true, help: 'neighbours used by the statistical outlier filter' },
  outlier_std_ratio: { type: 'number', default: 3, unit: '1', min: 0.5, max: 20, help: 'a voxel whose mean neighbour distance exceeds mean + ratio × std is an outlier' },
  remove_ground: { type: 'boolean', default: true, help: 'remove points near the estimated ground surface' },
  ground_cell_m: { type: 'number', default: 0.5, unit: 'm', min: 0.05, max: 10, help: 'cell size of the ground surface grid' },
  ground_height_m: { type: 'number', default: 0.06, unit: 'm', min: 0, max: 2, help: 'points up to this height above the ground surface are ground' },
  below_ground_m: { type: 'number', default: 0.15, unit: 'm', min: 0.01, max: 10, help: 'points more than this below the ground surface are noise' },
  base_search_height_m: { type: 'number', default: 0.6, unit: 'm', min: 0.05, max: 10, help: 'a stem must reach down to this height above ground' },
  base_slice_m: { type: 'number', default: 0.1, unit: 'm', min: 0.01, max: 2, help: 'the lowest slice of the stem used as the source of graph distances' },
  graph_neighbours: { type: 'number', default: 10, unit: '1', min: 3, max: 64, integer: true, help: 'neighbours per vertex of the neighbourhood graph' },
  graph_radius_m: { type: 'number', default: 0.04, unit: 'm', min: 0.005, max: 2, help: 'longest edge of the neighbourhood graph' },
  bridge_max_gap_m: { type: 'number', default: 0.6, unit: 'm', min: 0, max: 20, help: 'occlusion gaps up to this length are bridged to reattach branch pieces' },
  min_piece_voxels: { type: 'number', default: 4, unit: '1', min: 1, max: 100000, integer: true, help: 'detached pieces with fewer voxels are dropped as clutter' },
  leaf_filter: { type: 'boolean', default: false, help: 'drop leaf-like voxels (low linearity, high planarity/scattering) for leaf-on scans' },
  leaf_neighbours: { type: 'number', default: 16, unit: '1', min: 4, max: 64, integer: true, help: 'neighbours of the eigenvalue features of the wood/leaf filter' },
  leaf_linearity_max: { type: 'number', default: 0.5, unit: '1', min: 0, max: 1, help: 'voxels with linearity below this and scattering above leaf_scattering_min are leaves' },
  leaf_scattering_min: { type: 'number', default: 0.1, unit: '1', min: 0, max: 1, help: 'see leaf_linearity_max' },
  min_points: { type: 'number', default: 1000, unit: '1', min: 10, max: 1e9, integer: true, help: 'smaller clouds are refused (too few points for a network)' },
});

export type CleanOptionValues = OptionValues<typeof cleanOptions.specs>;

import type { Orbit } from './orbit.js';

/** Decoded segment geometry, relative to the stem base. */
export interface ViewGeometry {
  count: number;
  start: Float32Array;
  end: Float32Array;
  radius: Float32Array;
}

/** A drawing back end: WebGL (three.js) or the 2D-canvas fallback. */
export interface NetworkView {
  readonly mode: 'webgl' | '2d';
  /** 3 floats (0–1) per segment. */
  setColours(rgb: Float32Array): void;
  render(orbit: Orbit, width: number, height: number, minDrawRadiusPx: number): void;
}

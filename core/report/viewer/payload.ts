/**
 * The network data embedded in report.html for the 3D view. Arrays are little-endian Float32,
 * base64-encoded (a third of the size of JSON numbers and decoded in milliseconds).
 * Coordinates are relative to `origin` (the stem base), metres, z up.
 */
export interface ViewerLayer {
  key: string;
  label: string;
  /** Unit shown in the legend ("" for none). */
  unit: string;
  kind: 'continuous' | 'categorical';
  log?: boolean;
  reverse?: boolean;
  /** Categorical: names of the values 0, 1, 2 … */
  categories?: string[];
  /** base64 Float32Array, one value per segment (NaN = no value); absent when not available. */
  values?: string;
  /** Why the layer is not available. */
  missing?: string;
}

export interface ViewerPayload {
  count: number;
  origin: [number, number, number];
  /** base64 Float32Array: 3 per segment. */
  start: string;
  end: string;
  /** base64 Float32Array: 1 per segment, m. */
  radius: string;
  layers: ViewerLayer[];
  /** base64 Float32Array: segment_id per segment (exact below 2^24). */
  segmentIds: string;
  /** Reliability reason codes; `reasonIndex` points into it (−1 = reliable). */
  reasons: string[];
  /** base64 Float32Array: index into `reasons` per segment. */
  reasonIndex: string;
  initial: string;
  minDrawRadiusPx: number;
}

/** Id of the <script type="application/json"> element that holds the payload. */
export const PAYLOAD_ELEMENT_ID = 'xylemap-network';

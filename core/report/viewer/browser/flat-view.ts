import { basisOf, eyeOf, type Orbit } from '../orbit.js';
import type { NetworkView, ViewGeometry } from '../view.js';

/**
 * Fallback when WebGL is unavailable: a perspective projection onto a 2D canvas, segments drawn
 * as round-capped lines as wide as their projected diameter, far ones first (painter's order).
 */
export class FlatView implements NetworkView {
  readonly mode = '2d' as const;
  private rgb: Float32Array;
  private readonly ctx: CanvasRenderingContext2D;

  constructor(
    private readonly canvas: HTMLCanvasElement,
    private readonly geometry: ViewGeometry,
    private readonly background: string,
  ) {
    const ctx = canvas.getContext('2d');
    if (!ctx) throw new Error('no 2D canvas context');
    this.ctx = ctx;
    this.rgb = new Float32Array(3 * geometry.count);
  }

  setColours(rgb: Float32Array): void {
    this.rgb = rgb.slice();
  }

  render(o: Orbit, width: number, height: number, minDrawRadiusPx: number): void {
    const dpr = Math.min(2, window.devicePixelRatio || 1);
    this.canvas.width = Math.round(width * dpr);
    this.canvas.height = Math.round(height * dpr);
    const ctx = this.ctx;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.fillStyle = this.background;
    ctx.fillRect(0, 0, width, height);
    const { start, end, radius, count } = this.geometry;
    const eye = eyeOf(o);
    const { right, up, forward } = basisOf(o);
    const focal = height / 2 / Math.tan(((o.fovDeg / 2) * Math.PI) / 180);
    const near = o.distance / 1000;
    const sx = new Float32Array(2 * count);
    const sy = new Float32Array(2 * count);
    const depth = new Float32Array(count);
    const width2 = new Float32Array(count);
    const visible: number[] = [];
    const project = (p: Float32Array, i: number, slot: number): number => {
      const x = p[3 * i] - eye[0];
      const y = p[3 * i + 1] - eye[1];
      const z = p[3 * i + 2] - eye[2];
      const zc = x * forward[0] + y * forward[1] + z * forward[2];
      if (zc < near) return -1;
      sx[2 * i + slot] = width / 2 + ((x * right[0] + y * right[1] + z * right[2]) / zc) * focal;
      sy[2 * i + slot] = height / 2 - ((x * up[0] + y * up[1] + z * up[2]) / zc) * focal;
      return zc;
    };
    for (let i = 0; i < count; i++) {
      const za = project(start, i, 0);
      const zb = project(end, i, 1);
      if (za < 0 || zb < 0) continue;
      depth[i] = (za + zb) / 2;
      width2[i] = Math.max(minDrawRadiusPx * 2, (2 * radius[i] * focal) / depth[i]);
      visible.push(i);
    }
    visible.sort((a, b) => depth[b] - depth[a]);
    ctx.lineCap = 'round';
    for (const i of visible) {
      const r = Math.round(this.rgb[3 * i] * 255);
      const g = Math.round(this.rgb[3 * i + 1] * 255);
      const b = Math.round(this.rgb[3 * i + 2] * 255);
      ctx.strokeStyle = `rgb(${r},${g},${b})`;
      ctx.lineWidth = width2[i];
      ctx.beginPath();
      ctx.moveTo(sx[2 * i], sy[2 * i]);
      ctx.lineTo(sx[2 * i + 1], sy[2 * i + 1]);
      ctx.stroke();
    }
  }
}

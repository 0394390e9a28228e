import {
  AmbientLight,
  BufferAttribute,
  BufferGeometry,
  Color,
  CylinderGeometry,
  DirectionalLight,
  InstancedBufferAttribute,
  InstancedMesh,
  LineBasicMaterial,
  LineSegments,
  Matrix4,
  MeshLambertMaterial,
  PerspectiveCamera,
  Quaternion,
  Scene,
  Vector3,
  WebGLRenderer,
} from 'three';
import { eyeOf, type Orbit } from '../orbit.js';
import type { NetworkView, ViewGeometry } from '../view.js';

/** Above this many segments the view trades smoothness for speed (see the constructor). */
export const LARGE_NETWORK_SEGMENTS = 8000;

/** Segments thinner than this on screen (radius, px at the target distance) are drawn as 1-px lines. */
export const LINE_BELOW_RADIUS_PX = 0.75;

/**
 * The 3D view: segments sorted thickest first; the thick ones are one instanced open cylinder each
 * (one draw call), the ones too thin to show a cylinder are 1-px line segments (a second draw call).
 * Twigs are most of a tree and lines cost a fraction of a cylinder, which matters for software
 * rasterisers. Rendered on demand only, when the camera or the colours change.
 */
export class WebGlView implements NetworkView {
  readonly mode = 'webgl' as const;
  private readonly renderer: WebGLRenderer;
  private readonly scene = new Scene();
  private readonly camera = new PerspectiveCamera(40, 1, 0.01, 1e5);
  private readonly mesh: InstancedMesh;
  private readonly lines: LineSegments;
  private readonly light = new DirectionalLight(0xffffff, 1.6);
  /** Segment indices, thickest first; slot k of the mesh and the lines holds segment order[k]. */
  private readonly order: Uint32Array;
  private drawnPerPx = -1;

  constructor(
    private readonly canvas: HTMLCanvasElement,
    private readonly geometry: ViewGeometry,
    background: string,
  ) {
    const n = geometry.count;
    // Large networks: no multisampling and 6-sided cylinders, to spare software rasterisers
    // (SwiftShader in headless chromium).
    const large = n > LARGE_NETWORK_SEGMENTS;
    this.renderer = new WebGLRenderer({ canvas, antialias: !large, preserveDrawingBuffer: true });
    this.renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
    this.scene.background = new Color(background);
    this.camera.up.set(0, 0, 1);
    this.scene.add(new AmbientLight(0xffffff, 1.1));
    this.scene.add(this.light);

    this.order = Uint32Array.from({ length: n }, (_, i) => i).sort((a, b) => geometry.radius[b] - geometry.radius[a] || a - b);
    this.mesh = new InstancedMesh(new CylinderGeometry(1, 1, 1, large ? 6 : 8, 1, true), new MeshLambertMaterial({ color: 0xffffff }), n);
    this.mesh.instanceColor = new InstancedBufferAttribute(new Float32Array(3 * n), 3);
    this.mesh.frustumCulled = false;
    this.scene.add(this.mesh);

    const pos = new Float32Array(6 * n);
    for (let k = 0; k < n; k++) {
      const i = this.order[k];
      for (let c = 0; c < 3; c++) {
        pos[6 * k + c] = geometry.start[3 * i + c];
        pos[6 * k + 3 + c] = geometry.end[3 * i + c];
      }
    }
    const lg = new BufferGeometry();
    lg.setAttribute('position', new BufferAttribute(pos, 3));
    lg.setAttribute('color', new BufferAttribute(new Float32Array(6 * n), 3));
    this.lines = new LineSegments(lg, new LineBasicMaterial({ vertexColors: true }));
    this.lines.frustumCulled = false;
    this.scene.add(this.lines);
  }

  /**
   * Split thick from thin at the current zoom (`perPx` metres per pixel) and place the cylinders:
   * midpoint, rotation from +y to the axis, scale (r, length, r) with r at least `minR`.
   */
  private placeInstances(perPx: number, minR: number): void {
    const { start, end, radius, count } = this.geometry;
    let thick = 0;
    while (thick < count && radius[this.order[thick]] / perPx >= LINE_BELOW_RADIUS_PX) thick++;
    const m = new Matrix4();
    const q = new Quaternion();
    const yAxis = new Vector3(0, 1, 0);
    const dir = new Vector3();
    const mid = new Vector3();
    const scale = new Vector3();
    for (let k = 0; k < thick; k++) {
      const a = 3 * this.order[k];
      dir.set(end[a] - start[a], end[a + 1] - start[a + 1], end[a + 2] - start[a + 2]);
      const len = dir.length();
      if (len > 0) dir.divideScalar(len);
      else dir.set(0, 0, 1);
      q.setFromUnitVectors(yAxis, dir);
      mid.set((start[a] + end[a]) / 2, (start[a + 1] + end[a + 1]) / 2, (start[a + 2] + end[a + 2]) / 2);
      const r = Math.max(radius[this.order[k]], minR);
      scale.set(r, Math.max(len, 1e-6), r);
      m.compose(mid, q, scale);
      this.mesh.setMatrixAt(k, m);
    }
    this.mesh.count = thick;
    this.mesh.instanceMatrix.needsUpdate = true;
    this.lines.geometry.setDrawRange(2 * thick, 2 * (count - thick));
  }

  setColours(rgb: Float32Array): void {
    const inst = this.mesh.instanceColor!.array as Float32Array;
    const line = (this.lines.geometry.getAttribute('color') as BufferAttribute).array as Float32Array;
    for (let k = 0; k < this.order.length; k++) {
      const i = this.order[k];
      for (let c = 0; c < 3; c++) {
        const v = rgb[3 * i + c];
        inst[3 * k + c] = v;
        line[6 * k + c] = v;
        line[6 * k + 3 + c] = v;
      }
    }
    this.mesh.instanceColor!.needsUpdate = true;
    this.lines.geometry.getAttribute('color').needsUpdate = true;
  }

  render(o: Orbit, width: number, height: number, minDrawRadiusPx: number): void {
    this.renderer.setSize(width, height, false);
    this.camera.aspect = width / Math.max(1, height);
    this.camera.fov = o.fovDeg;
    this.camera.near = Math.max(1e-3, o.distance / 1000);
    this.camera.far = o.distance * 20;
    const eye = eyeOf(o);
    this.camera.position.set(eye[0], eye[1], eye[2]);
    this.camera.lookAt(o.target[0], o.target[1], o.target[2]);
    this.camera.updateProjectionMatrix();
    this.light.position.set(eye[0] + o.distance * 0.3, eye[1], eye[2] + o.distance * 0.6);
    // Re-split and re-place when the zoom changed by > 15 % (cheap: one pass over the segments).
    const perPx = (2 * o.distance * Math.tan(((o.fovDeg / 2) * Math.PI) / 180)) / Math.max(1, height);
    if (this.drawnPerPx < 0 || Math.abs(perPx / this.drawnPerPx - 1) > 0.15) {
      this.placeInstances(perPx, minDrawRadiusPx * perPx);
      this.drawnPerPx = perPx;
    }
    this.renderer.render(this.scene, this.camera);
  }
}

/** True when the browser can give a WebGL2 context (three.js needs WebGL2). */
export function webGl2Available(): boolean {
  try {
    const c = document.createElement('canvas');
    const gl = c.getContext('webgl2');
    if (!gl) return false;
    gl.getExtension('WEBGL_lose_context')?.loseContext();
    return true;
  } catch {
    return false;
  }
}

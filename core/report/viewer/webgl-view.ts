/// <reference lib="dom" />
import {
  AmbientLight,
  Color,
  CylinderGeometry,
  DirectionalLight,
  InstancedBufferAttribute,
  InstancedMesh,
  Matrix4,
  MeshLambertMaterial,
  PerspectiveCamera,
  Quaternion,
  Scene,
  Vector3,
  WebGLRenderer,
} from 'three';
import { eyeOf, type Orbit } from './orbit.js';
import type { NetworkView, ViewGeometry } from './view.js';

/**
 * The 3D view: one instanced, open-ended 8-sided cylinder per segment (one draw call for the whole
 * network), rendered on demand only when the camera or colours change.
 */
export class WebGlView implements NetworkView {
  readonly mode = 'webgl' as const;
  private readonly renderer: WebGLRenderer;
  private readonly scene = new Scene();
  private readonly camera = new PerspectiveCamera(40, 1, 0.01, 1e5);
  private readonly mesh: InstancedMesh;
  private readonly light = new DirectionalLight(0xffffff, 1.6);
  private drawnPerPx = -1;

  constructor(
    private readonly canvas: HTMLCanvasElement,
    private readonly geometry: ViewGeometry,
    background: string,
  ) {
    this.renderer = new WebGLRenderer({ canvas, antialias: true, preserveDrawingBuffer: true });
    this.renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
    this.scene.background = new Color(background);
    this.camera.up.set(0, 0, 1);
    this.scene.add(new AmbientLight(0xffffff, 1.1));
    this.scene.add(this.light);
    const mat = new MeshLambertMaterial({ color: 0xffffff });
    this.mesh = new InstancedMesh(new CylinderGeometry(1, 1, 1, 8, 1, true), mat, geometry.count);
    this.mesh.instanceColor = new InstancedBufferAttribute(new Float32Array(3 * geometry.count), 3);
    this.mesh.frustumCulled = false;
    this.scene.add(this.mesh);
  }

  /** Instance matrices: midpoint, rotation from +y to the axis, scale (r, length, r); r at least `minR`. */
  private placeInstances(minR: number): void {
    const { start, end, radius, count } = this.geometry;
    const m = new Matrix4();
    const q = new Quaternion();
    const yAxis = new Vector3(0, 1, 0);
    const dir = new Vector3();
    const mid = new Vector3();
    const scale = new Vector3();
    for (let i = 0; i < count; i++) {
      const a = 3 * i;
      dir.set(end[a] - start[a], end[a + 1] - start[a + 1], end[a + 2] - start[a + 2]);
      const len = dir.length();
      if (len > 0) dir.divideScalar(len);
      else dir.set(0, 0, 1);
      q.setFromUnitVectors(yAxis, dir);
      mid.set((start[a] + end[a]) / 2, (start[a + 1] + end[a + 1]) / 2, (start[a + 2] + end[a + 2]) / 2);
      const r = Math.max(radius[i], minR);
      scale.set(r, Math.max(len, 1e-6), r);
      m.compose(mid, q, scale);
      this.mesh.setMatrixAt(i, m);
    }
    this.mesh.instanceMatrix.needsUpdate = true;
  }

  setColours(rgb: Float32Array): void {
    (this.mesh.instanceColor!.array as Float32Array).set(rgb);
    this.mesh.instanceColor!.needsUpdate = true;
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
    // Keep fine twigs at least `minDrawRadiusPx` wide: re-place instances when the zoom changed by > 15 %.
    const perPx = (2 * o.distance * Math.tan(((o.fovDeg / 2) * Math.PI) / 180)) / Math.max(1, height);
    if (this.drawnPerPx < 0 || Math.abs(perPx / this.drawnPerPx - 1) > 0.15) {
      this.placeInstances(minDrawRadiusPx * perPx);
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

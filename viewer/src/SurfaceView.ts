/**
 * The surface in the centre of the page: a three.js mesh whose vertex colours
 * paint one species, a headlight that keeps colours readable from any side,
 * orbit/zoom/pan, a wireframe overlay, and brushing accelerated by a BVH
 * (three-mesh-bvh), so picking stays fast on meshes of 200k vertices.
 */
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import { MeshBVH, acceleratedRaycast } from 'three-mesh-bvh';
import { srgbToLinear } from '../../solver/io/writeGlb.ts';
import { webglRenderer } from './softwareWebgl.ts';

THREE.Mesh.prototype.raycast = acceleratedRaycast;

export interface BrushStroke {
  vertices: Uint32Array;
  weights: Float32Array;
}

export class SurfaceView {
  readonly renderer: THREE.WebGLRenderer;
  readonly scene = new THREE.Scene();
  readonly camera = new THREE.PerspectiveCamera(35, 1, 0.01, 1000);
  readonly controls: OrbitControls;
  private geometry = new THREE.BufferGeometry();
  private readonly surface: THREE.Mesh;
  private readonly wire: THREE.Mesh;
  private readonly cursor: THREE.Mesh;
  private bvhStale = true;
  /** the surface moved (same triangles): the BVH's boxes need refitting, not rebuilding */
  private bvhMoved = false;
  private readonly raycaster = new THREE.Raycaster();
  /** brush radius as a fraction of the surface's bounding radius */
  brushRadius = 0.06;
  brushing: 'off' | 'seed' | 'erase' = 'off';
  onStroke: ((s: BrushStroke) => void) | undefined;
  /** milliseconds the last brush dab took to pick the surface and gather its vertices */
  lastBrushMs = 0;
  private positions: Float64Array = new Float64Array(0);
  /** bounding radius of the surface when the camera was last framed on it */
  private framedRadius = 0;
  private drawRequested = false;

  /** the WebGL renderer's name, and whether the surface is drawn with antialiasing (not in software WebGL) */
  readonly gl: { renderer: string; antialias: boolean };

  constructor(private readonly container: HTMLElement) {
    const { name, software } = webglRenderer();
    this.gl = { renderer: name, antialias: !software };
    this.renderer = new THREE.WebGLRenderer({ antialias: !software, preserveDrawingBuffer: false });
    this.renderer.setPixelRatio(software ? 1 : Math.min(window.devicePixelRatio, 2));
    this.renderer.setClearColor(0xf4f2ee);
    container.append(this.renderer.domElement);
    this.renderer.domElement.id = 'surface-canvas';
    this.controls = new OrbitControls(this.camera, this.renderer.domElement);
    this.controls.enableDamping = false;
    this.controls.addEventListener('change', () => this.draw());
    // soft light from everywhere plus a light at the eye: colours keep their hue on every side
    this.scene.add(new THREE.HemisphereLight(0xffffff, 0xd8d4cc, 1.6));
    const headlight = new THREE.DirectionalLight(0xffffff, 1.4);
    this.camera.add(headlight);
    headlight.position.set(0.3, 0.4, 1);
    this.scene.add(this.camera);
    const material = new THREE.MeshLambertMaterial({ vertexColors: true, side: THREE.DoubleSide });
    this.surface = new THREE.Mesh(this.geometry, material);
    this.wire = new THREE.Mesh(this.geometry, new THREE.MeshBasicMaterial({ color: 0x202020, wireframe: true, transparent: true, opacity: 0.25 }));
    this.wire.visible = false;
    this.cursor = new THREE.Mesh(new THREE.SphereGeometry(1, 24, 12), new THREE.MeshBasicMaterial({ color: 0xffffff, transparent: true, opacity: 0.35, depthWrite: false }));
    this.cursor.visible = false;
    this.scene.add(this.surface, this.wire, this.cursor);
    new ResizeObserver(() => this.resize()).observe(container);
    this.resize();
    this.installBrush();
  }

  get vertexCount(): number {
    return this.positions.length / 3;
  }

  /** A new surface (new connectivity): rebuild the geometry; frame the camera on the first one or when asked; zoom out if it outgrew the view. */
  setSurface(positions: Float64Array, triangles: Uint32Array, reframe = false): void {
    this.geometry.dispose();
    this.geometry = new THREE.BufferGeometry();
    this.positions = positions;
    this.geometry.setAttribute('position', new THREE.BufferAttribute(new Float32Array(positions), 3));
    this.geometry.setAttribute('color', new THREE.BufferAttribute(new Float32Array(positions.length).fill(0.8), 3));
    // a copy: building the BVH reorders the index in place, and the triangles belong to the frame (exports, timeline)
    this.geometry.setIndex(new THREE.BufferAttribute(triangles.slice(), 1));
    this.geometry.computeVertexNormals();
    this.geometry.computeBoundingSphere();
    this.surface.geometry = this.geometry;
    this.wire.geometry = this.geometry;
    this.bvhStale = true;
    if (reframe || !this.framedRadius) this.frame();
    else this.keepInView();
    this.draw();
  }

  /** The same connectivity, moved (a growing surface). */
  movePositions(positions: Float64Array): void {
    this.positions = positions;
    const attr = this.geometry.getAttribute('position') as THREE.BufferAttribute;
    (attr.array as Float32Array).set(positions);
    attr.needsUpdate = true;
    this.geometry.computeVertexNormals();
    this.geometry.computeBoundingSphere();
    this.bvhMoved = true;
    this.keepInView();
    this.draw();
  }

  /** A growing surface that has outgrown the view by a fifth: step the camera back along its line of sight. */
  private keepInView(): void {
    const s = this.geometry.boundingSphere;
    if (!s || s.radius <= 1.2 * this.framedRadius) return;
    const scale = s.radius / this.framedRadius;
    this.framedRadius = s.radius;
    const offset = this.camera.position.clone().sub(this.controls.target).multiplyScalar(scale);
    this.controls.target.copy(s.center);
    this.camera.position.copy(s.center).add(offset);
    this.camera.far *= scale;
    this.camera.near *= scale;
    this.camera.updateProjectionMatrix();
    this.controls.update();
  }

  /** sRGB bytes per vertex → the colour attribute (linear, as three.js lights it). */
  setColors(srgb: Uint8Array): void {
    const attr = this.geometry.getAttribute('color') as THREE.BufferAttribute;
    const a = attr.array as Float32Array;
    for (let i = 0; i < a.length; i++) a[i] = LINEAR[srgb[i]];
    attr.needsUpdate = true;
    this.draw();
  }

  setWireframe(on: boolean): void {
    this.wire.visible = on;
    this.draw();
  }

  /** Look at the whole surface from the front-right, slightly above. */
  frame(): void {
    const s = this.geometry.boundingSphere;
    if (!s) return;
    this.framedRadius = s.radius;
    const d = s.radius / Math.sin(THREE.MathUtils.degToRad(this.camera.fov / 2)) * 1.1;
    this.controls.target.copy(s.center);
    this.camera.position.copy(s.center).add(new THREE.Vector3(0.55, -0.75, 0.45).normalize().multiplyScalar(d));
    this.camera.up.set(0, 0, 1);
    this.camera.near = d / 100;
    this.camera.far = d * 10;
    this.camera.updateProjectionMatrix();
    this.controls.update();
    this.draw();
  }

  /**
   * Milliseconds a drawn frame keeps the page busy beyond an idle frame
   * (smoothed): from the frame that renders to the next one. Software WebGL on
   * a busy machine makes this tens of milliseconds; the live paints slow down
   * to match (see app.ts).
   */
  frameCostMs = 0;

  draw(): void {
    if (this.drawRequested) return;
    this.drawRequested = true;
    requestAnimationFrame((start) => {
      this.drawRequested = false;
      this.renderer.render(this.scene, this.camera);
      requestAnimationFrame((next) => {
        const cost = Math.max(0, next - start - 1000 / 60);
        this.frameCostMs = this.frameCostMs === 0 ? cost : 0.7 * this.frameCostMs + 0.3 * cost;
      });
    });
  }

  /** Render now at width×height pixels and return the canvas (for PNG export); the view is restored after. */
  renderAt(width: number, height: number): HTMLCanvasElement {
    const canvas = this.renderer.domElement;
    const size = new THREE.Vector2();
    this.renderer.getSize(size);
    const ratio = this.renderer.getPixelRatio();
    this.renderer.setPixelRatio(1);
    this.renderer.setSize(width, height, false);
    this.camera.aspect = width / height;
    this.camera.updateProjectionMatrix();
    this.renderer.render(this.scene, this.camera);
    const copy = document.createElement('canvas');
    copy.width = width;
    copy.height = height;
    copy.getContext('2d')!.drawImage(canvas, 0, 0);
    this.renderer.setPixelRatio(ratio);
    this.renderer.setSize(size.x, size.y, false);
    this.camera.aspect = size.x / Math.max(1, size.y);
    this.camera.updateProjectionMatrix();
    this.renderer.render(this.scene, this.camera);
    return copy;
  }

  private resize() {
    const w = Math.max(1, this.container.clientWidth), h = Math.max(1, this.container.clientHeight);
    this.renderer.setSize(w, h, false);
    this.renderer.domElement.style.width = '100%';
    this.renderer.domElement.style.height = '100%';
    this.camera.aspect = w / h;
    this.camera.updateProjectionMatrix();
    this.draw();
  }

  /** The surface point under a pixel of the canvas, if any. */
  pick(clientX: number, clientY: number): { point: THREE.Vector3; face: number } | undefined {
    if (this.bvhStale) {
      this.geometry.boundsTree = new MeshBVH(this.geometry);
      this.bvhStale = false;
      this.bvhMoved = false;
    } else if (this.bvhMoved) {
      this.geometry.boundsTree!.refit();
      this.bvhMoved = false;
    }
    const rect = this.renderer.domElement.getBoundingClientRect();
    const ndc = new THREE.Vector2(((clientX - rect.left) / rect.width) * 2 - 1, -((clientY - rect.top) / rect.height) * 2 + 1);
    this.raycaster.setFromCamera(ndc, this.camera);
    this.raycaster.firstHitOnly = true;
    const hit = this.raycaster.intersectObject(this.surface, false)[0];
    return hit && hit.faceIndex !== undefined && hit.faceIndex !== null ? { point: hit.point, face: hit.faceIndex } : undefined;
  }

  /**
   * Vertices within the brush of a point on triangle `face`, weighted 1 at the
   * centre to 0 at the rim (smooth); a brush smaller than the triangles paints
   * at least the triangle's nearest corner.
   */
  brushAt(point: THREE.Vector3, face: number): BrushStroke {
    const r = this.brushRadius * (this.geometry.boundingSphere?.radius ?? 1);
    const sphere = new THREE.Sphere(point, r);
    const index = this.geometry.index!.array as Uint32Array;
    const p = this.positions;
    const found = new Map<number, number>();
    this.geometry.boundsTree!.shapecast({
      intersectsBounds: (box) => sphere.intersectsBox(box),
      intersectsTriangle: (_tri, t) => {
        for (let c = 0; c < 3; c++) {
          const i = index[3 * t + c];
          if (found.has(i)) continue;
          const dx = p[3 * i] - point.x, dy = p[3 * i + 1] - point.y, dz = p[3 * i + 2] - point.z;
          const q = (dx * dx + dy * dy + dz * dz) / (r * r);
          if (q <= 1) found.set(i, (1 - q) * (1 - q));
        }
        return false;
      },
    });
    if (!found.size) {
      let best = -1, bestD = Infinity;
      for (let c = 0; c < 3; c++) {
        const i = index[3 * face + c];
        const d = (p[3 * i] - point.x) ** 2 + (p[3 * i + 1] - point.y) ** 2 + (p[3 * i + 2] - point.z) ** 2;
        if (d < bestD) { bestD = d; best = i; }
      }
      found.set(best, 1);
    }
    return { vertices: Uint32Array.from(found.keys()), weights: Float32Array.from(found.values()) };
  }

  private installBrush() {
    const canvas = this.renderer.domElement;
    let down = false;
    const apply = (e: PointerEvent) => {
      const t0 = performance.now();
      const hit = this.pick(e.clientX, e.clientY);
      const r = this.brushRadius * (this.geometry.boundingSphere?.radius ?? 1);
      this.cursor.visible = !!hit;
      if (hit) {
        this.cursor.position.copy(hit.point);
        this.cursor.scale.setScalar(r);
      }
      this.draw();
      if (hit && down) {
        const stroke = this.brushAt(hit.point, hit.face);
        this.lastBrushMs = performance.now() - t0;
        if (stroke.vertices.length) this.onStroke?.(stroke);
      }
    };
    canvas.addEventListener('pointerdown', (e) => {
      if (this.brushing === 'off' || e.button !== 0) return;
      down = true;
      canvas.setPointerCapture(e.pointerId);
      apply(e);
    });
    canvas.addEventListener('pointermove', (e) => {
      if (this.brushing === 'off') { if (this.cursor.visible) { this.cursor.visible = false; this.draw(); } return; }
      apply(e);
    });
    canvas.addEventListener('pointerup', () => { down = false; });
    canvas.addEventListener('pointerleave', () => { this.cursor.visible = false; this.draw(); });
  }

  setBrush(mode: 'off' | 'seed' | 'erase'): void {
    this.brushing = mode;
    this.controls.enabled = mode === 'off';
    this.cursor.visible = false;
    this.draw();
  }
}

const LINEAR = Float32Array.from({ length: 256 }, (_, i) => srgbToLinear(i));

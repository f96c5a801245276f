// The 3D scene of the folded shape, outside React so a scrubbed frame is one buffer update and one draw.
// Each panel is placed by its own rigid transform (the base panel stays where the flat sheet has it);
// top and underside are told apart by shade, the base panel and panels past a hinge limit by colour.

import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { Pattern } from '../../solver/types';
import { triangulatePanel } from '../../solver/formats/shape-export';
import { flatBounds } from '../geometry';
import { placePanels, planShape, type ShapePlan } from '../shape-kernel';
import { PALETTE } from '../palette';

export interface SceneOptions {
  ghost: boolean;
  labels: boolean;
  selected: number | null;
  drives: number[];
  violatingPanels: Set<number>;
  /** panels in contact with another (drawn in the contact colour) */
  contactPanels?: Set<number>;
  basePanel: number;
  labelText: (crease: number) => string;
}

const COLORS = {
  top: new THREE.Color(PALETTE.panelTop),
  base: new THREE.Color(PALETTE.base),
  violating: new THREE.Color(PALETTE.pastLimit),
  valley: new THREE.Color(PALETTE.valley),
  mountain: new THREE.Color(PALETTE.mountain),
  unassigned: new THREE.Color(PALETTE.flat),
  boundary: new THREE.Color(PALETTE.boundary),
  contact: new THREE.Color(PALETTE.contact),
  selected: new THREE.Color('#111111'),
  drive: new THREE.Color(PALETTE.drive),
};

const SVG_NS = 'http://www.w3.org/2000/svg';

/** A length of 1, 2 or 5 × 10ᵏ units near `target` (for the scale bar). */
export function niceLength(target: number): number {
  if (!(target > 0) || !Number.isFinite(target)) return 1;
  const k = Math.floor(Math.log10(target));
  const base = 10 ** k;
  const m = target / base;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * base;
}

/** Most labels drawn at once; beyond that the drives and the selected crease are labelled. */
export const MAX_LABELS = 250;

export class FoldedScene {
  readonly renderer: THREE.WebGLRenderer;
  private scene = new THREE.Scene();
  private camera = new THREE.PerspectiveCamera(35, 1, 0.01, 1e7);
  private controls: OrbitControls;
  private topMesh: THREE.Mesh;
  private backMesh: THREE.Mesh;
  private lines: THREE.LineSegments;
  private marks: THREE.LineSegments;
  private ghost: THREE.LineSegments;
  private geometry = new THREE.BufferGeometry();
  private lineGeometry = new THREE.BufferGeometry();
  private markGeometry = new THREE.BufferGeometry();
  private ghostGeometry = new THREE.BufferGeometry();
  private pattern: Pattern | null = null;
  /** per panel: flat (x, y) of its triangle corners, in buffer order */
  private triangles: { panel: number; corners: number[] }[] = [];
  private creasePanel: number[] = [];
  private positions = new Float32Array(0);
  private linePositions = new Float32Array(0);
  private plan: ShapePlan | null = null;
  private transforms = new Float64Array(0);
  private radians = new Float64Array(0);
  private width = 1;
  private height = 1;
  private options: SceneOptions | null = null;
  private labelLayer: HTMLDivElement;
  private labelPool: HTMLDivElement[] = [];
  private frameRequested = false;
  private disposed = false;
  /** the axis triad and the scale bar, drawn over the canvas */
  private overlay: SVGSVGElement;
  /** re-fit the view as the shape changes, until the person zooms or pans */
  autoFit = true;
  onAutoFitChange?: (on: boolean) => void;
  /** the length unit shown with the scale bar */
  units = '';
  /** frames drawn so far (the benchmark counts them) */
  frames = 0;

  constructor(private readonly host: HTMLElement) {
    // multisampling on a software GL (virtual machines, remote desktops, CI) costs more than the whole scene
    this.renderer = new THREE.WebGLRenderer({ antialias: !softwareGl() });
    this.renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
    this.renderer.setClearColor('#e9e6de');
    host.appendChild(this.renderer.domElement);
    this.labelLayer = document.createElement('div');
    this.labelLayer.className = 'scene-labels';
    host.appendChild(this.labelLayer);

    this.scene.add(new THREE.HemisphereLight('#ffffff', '#8d8a80', 1.6));
    const sun = new THREE.DirectionalLight('#ffffff', 1.4);
    sun.position.set(0.4, -0.6, 1);
    this.camera.add(sun);
    this.scene.add(this.camera);

    const top = new THREE.MeshLambertMaterial({ vertexColors: true, side: THREE.FrontSide, polygonOffset: true, polygonOffsetFactor: 1, polygonOffsetUnits: 1 });
    const back = new THREE.MeshLambertMaterial({ vertexColors: true, side: THREE.BackSide, color: PALETTE.panelUnder, polygonOffset: true, polygonOffsetFactor: 1, polygonOffsetUnits: 1 });
    this.topMesh = new THREE.Mesh(this.geometry, top);
    this.backMesh = new THREE.Mesh(this.geometry, back);
    this.lines = new THREE.LineSegments(this.lineGeometry, new THREE.LineBasicMaterial({ vertexColors: true }));
    this.marks = new THREE.LineSegments(this.markGeometry, new THREE.LineBasicMaterial({ vertexColors: true, depthTest: false }));
    this.marks.renderOrder = 2;
    this.ghost = new THREE.LineSegments(this.ghostGeometry, new THREE.LineBasicMaterial({ color: '#7f7b72', transparent: true, opacity: 0.45 }));
    this.scene.add(this.topMesh, this.backMesh, this.lines, this.marks, this.ghost);

    this.controls = new OrbitControls(this.camera, this.renderer.domElement);
    this.controls.enableDamping = false;
    this.controls.screenSpacePanning = true;
    this.controls.addEventListener('change', () => this.requestFrame());
    // zooming or panning by hand takes the view over: stop re-fitting until Fit is pressed
    const takeOver = () => {
      if (!this.autoFit) return;
      this.autoFit = false;
      this.onAutoFitChange?.(false);
    };
    this.renderer.domElement.addEventListener('wheel', takeOver, { passive: true });
    this.renderer.domElement.addEventListener('pointerdown', (e) => {
      if (e.button === 2 || e.shiftKey || e.ctrlKey || e.metaKey) takeOver();
    });
    this.overlay = document.createElementNS(SVG_NS, 'svg');
    this.overlay.setAttribute('class', 'scene-overlay');
    this.overlay.setAttribute('aria-hidden', 'true');
    host.appendChild(this.overlay);
    this.resize();
  }

  setPattern(pattern: Pattern): void {
    if (pattern === this.pattern) return;
    this.pattern = pattern;
    this.plan = null;
    this.triangles = pattern.panels.map((p) => ({
      panel: p.index,
      corners: triangulatePanel(pattern, p.vertices).flatMap((t) => t.map((k) => p.vertices[k])),
    }));
    const count = this.triangles.reduce((n, t) => n + t.corners.length, 0);
    this.positions = new Float32Array(count * 3);
    this.geometry.setAttribute('position', new THREE.BufferAttribute(this.positions, 3));
    this.geometry.setAttribute('color', new THREE.BufferAttribute(new Float32Array(count * 3), 3));
    // each crease is drawn from the side of one panel that touches it
    this.creasePanel = pattern.creases.map((c) => (c.leftPanel >= 0 ? c.leftPanel : c.rightPanel));
    this.linePositions = new Float32Array(pattern.creases.length * 6);
    this.lineGeometry.setAttribute('position', new THREE.BufferAttribute(this.linePositions, 3));
    const lineColors = new Float32Array(pattern.creases.length * 6);
    pattern.creases.forEach((c, i) => {
      const col = c.assignment === 'V' ? COLORS.valley : c.assignment === 'M' ? COLORS.mountain : c.assignment === 'B' ? COLORS.boundary : COLORS.unassigned;
      col.toArray(lineColors, 6 * i);
      col.toArray(lineColors, 6 * i + 3);
    });
    this.lineGeometry.setAttribute('color', new THREE.BufferAttribute(lineColors, 3));
    const ghost = new Float32Array(pattern.creases.length * 6);
    pattern.creases.forEach((c, i) => {
      const [a, b] = c.vertices;
      ghost.set([pattern.vertices[a][0], pattern.vertices[a][1], 0, pattern.vertices[b][0], pattern.vertices[b][1], 0], 6 * i);
    });
    this.ghostGeometry.setAttribute('position', new THREE.BufferAttribute(ghost, 3));
    this.ghostGeometry.computeBoundingSphere();
  }

  /** Place every panel for these fold angles (degrees per crease) and redraw. */
  setAngles(anglesDeg: readonly number[], basePanel: number): void {
    const pattern = this.pattern;
    if (!pattern) return;
    if (!this.plan || this.plan.base !== basePanel) {
      this.plan = planShape(pattern, basePanel);
      this.transforms = new Float64Array(12 * pattern.panels.length);
      this.radians = new Float64Array(pattern.creases.length);
    }
    for (let i = 0; i < this.radians.length; i++) this.radians[i] = ((anglesDeg[i] ?? 0) * Math.PI) / 180;
    const T = placePanels(this.plan, this.radians, this.transforms);
    const P = pattern.vertices;
    let o = 0;
    const pos = this.positions;
    for (const t of this.triangles) {
      const b = 12 * t.panel;
      for (const v of t.corners) {
        const x = P[v][0], y = P[v][1];
        pos[o++] = T[b] * x + T[b + 1] * y + T[b + 3];
        pos[o++] = T[b + 4] * x + T[b + 5] * y + T[b + 7];
        pos[o++] = T[b + 8] * x + T[b + 9] * y + T[b + 11];
      }
    }
    this.geometry.attributes.position.needsUpdate = true;
    this.geometry.computeVertexNormals();
    this.geometry.computeBoundingSphere();
    const lp = this.linePositions;
    pattern.creases.forEach((c, i) => {
      const b = 12 * Math.max(0, this.creasePanel[i]);
      for (let e = 0; e < 2; e++) {
        const x = P[c.vertices[e]][0], y = P[c.vertices[e]][1];
        lp[6 * i + 3 * e] = T[b] * x + T[b + 1] * y + T[b + 3];
        lp[6 * i + 3 * e + 1] = T[b + 4] * x + T[b + 5] * y + T[b + 7];
        lp[6 * i + 3 * e + 2] = T[b + 8] * x + T[b + 9] * y + T[b + 11];
      }
    });
    this.lineGeometry.attributes.position.needsUpdate = true;
    this.lineGeometry.computeBoundingSphere();
    this.updateMarks();
    if (this.autoFit) this.refit();
    this.requestFrame();
  }

  /** Keep the direction of view, centre the shape and fit its size (as the sheet folds it shrinks). */
  private refit(): void {
    const sphere = this.geometry.boundingSphere;
    if (!sphere || !Number.isFinite(sphere.radius) || sphere.radius === 0) return;
    const fov = (this.camera.fov * Math.PI) / 180;
    const dist = (sphere.radius * 1.15) / Math.sin(Math.min(fov, fov * this.camera.aspect) / 2);
    const dir = this.camera.position.clone().sub(this.controls.target);
    if (dir.lengthSq() === 0) dir.set(0.35, -0.75, 0.85);
    dir.normalize();
    this.camera.position.copy(sphere.center).addScaledVector(dir, dist);
    this.camera.near = dist / 1000;
    this.camera.far = dist * 100;
    this.camera.updateProjectionMatrix();
    this.controls.target.copy(sphere.center);
    this.controls.update();
  }

  setOptions(options: SceneOptions): void {
    this.options = options;
    this.ghost.visible = options.ghost;
    const colors = this.geometry.getAttribute('color') as THREE.BufferAttribute | undefined;
    if (colors) {
      const arr = colors.array as Float32Array;
      let o = 0;
      for (const t of this.triangles) {
        const col = options.contactPanels?.has(t.panel) ? COLORS.contact : options.violatingPanels.has(t.panel) ? COLORS.violating : t.panel === options.basePanel ? COLORS.base : COLORS.top;
        for (let k = 0; k < t.corners.length; k++) {
          col.toArray(arr, o);
          o += 3;
        }
      }
      colors.needsUpdate = true;
    }
    this.updateMarks();
    this.requestFrame();
  }

  /** The selected crease and the drives drawn on top, so they stay visible through panels. */
  private updateMarks(): void {
    const pattern = this.pattern;
    const opts = this.options;
    if (!pattern || !opts) return;
    const marked = [...opts.drives, ...(opts.selected !== null ? [opts.selected] : [])];
    const pos = new Float32Array(marked.length * 6);
    const col = new Float32Array(marked.length * 6);
    marked.forEach((c, k) => {
      pos.set(this.linePositions.subarray(6 * c, 6 * c + 6), 6 * k);
      const color = opts.selected === c ? COLORS.selected : COLORS.drive;
      color.toArray(col, 6 * k);
      color.toArray(col, 6 * k + 3);
    });
    this.markGeometry.setAttribute('position', new THREE.BufferAttribute(pos, 3));
    this.markGeometry.setAttribute('color', new THREE.BufferAttribute(col, 3));
  }

  /** Look at the whole shape from above and to the side, and follow it again as it folds. */
  fit(): void {
    if (!this.autoFit) {
      this.autoFit = true;
      this.onAutoFitChange?.(true);
    }
    this.geometry.computeBoundingSphere();
    const sphere = this.geometry.boundingSphere;
    const pattern = this.pattern;
    if (!sphere || !pattern || !Number.isFinite(sphere.radius) || sphere.radius === 0) {
      if (!pattern) return;
      const b = flatBounds(pattern);
      this.frame(new THREE.Vector3((b.minX + b.maxX) / 2, (b.minY + b.maxY) / 2, 0), Math.hypot(b.maxX - b.minX, b.maxY - b.minY) / 2);
      return;
    }
    this.frame(sphere.center.clone(), sphere.radius);
  }

  private frame(center: THREE.Vector3, radius: number): void {
    const fov = (this.camera.fov * Math.PI) / 180;
    const dist = (radius * 1.15) / Math.sin(Math.min(fov, fov * this.camera.aspect) / 2);
    const dir = new THREE.Vector3(0.35, -0.75, 0.85).normalize();
    this.camera.up.set(0, 0, 1);
    this.camera.position.copy(center).addScaledVector(dir, dist);
    this.camera.near = dist / 1000;
    this.camera.far = dist * 100;
    this.camera.updateProjectionMatrix();
    this.controls.target.copy(center);
    this.controls.update();
    this.requestFrame();
  }

  resize(): void {
    const w = Math.max(1, this.host.clientWidth);
    const h = Math.max(1, this.host.clientHeight);
    // kept, so drawing labels never forces a layout in the middle of a frame
    this.width = w;
    this.height = h;
    this.renderer.setSize(w, h, true);
    this.camera.aspect = w / h;
    this.camera.updateProjectionMatrix();
    this.requestFrame();
  }

  /** Draw once after the current task: several changes in one React commit make one draw, in this frame. */
  requestFrame(): void {
    if (this.frameRequested) return;
    this.frameRequested = true;
    queueMicrotask(() => {
      this.frameRequested = false;
      if (!this.disposed) this.draw();
    });
  }

  private draw(): void {
    this.renderer.render(this.scene, this.camera);
    this.frames++;
    this.host.dataset.frames = String(this.frames);
    this.drawLabels();
    this.drawOverlay();
  }

  /**
   * The axis triad of the sheet's frame (x, y in the flat sheet, z towards the side valleys fold to) at the
   * lower left, and a scale bar of a round length at the lower right, both from the camera as it is now.
   */
  private drawOverlay(): void {
    const o = this.overlay;
    const w = this.width, h = this.height;
    const view = new THREE.Matrix4().extractRotation(this.camera.matrixWorldInverse);
    const axes: [string, THREE.Vector3, string][] = [
      ['x', new THREE.Vector3(1, 0, 0), '#a8170d'],
      ['y', new THREE.Vector3(0, 1, 0), '#00764c'],
      ['z', new THREE.Vector3(0, 0, 1), '#2e2a7a'],
    ];
    const cx = 30, cy = h - 30, len = 20;
    const parts: string[] = [`<circle cx="${cx}" cy="${cy}" r="2" fill="#4a473f"/>`];
    for (const [name, v, color] of axes) {
      const p = v.clone().applyMatrix4(view);
      const x = cx + p.x * len, y = cy - p.y * len;
      parts.push(`<line x1="${cx}" y1="${cy}" x2="${x.toFixed(1)}" y2="${y.toFixed(1)}" stroke="${color}" stroke-width="2"/>`);
      parts.push(`<text x="${(cx + p.x * (len + 8)).toFixed(1)}" y="${(cy - p.y * (len + 8) + 3).toFixed(1)}" font-size="10" text-anchor="middle" fill="${color}">${name}</text>`);
    }
    // pixels per unit of length at the distance of the view's centre
    const dist = this.camera.position.distanceTo(this.controls.target);
    const pxPerUnit = h / (2 * dist * Math.tan((this.camera.fov * Math.PI) / 360));
    if (Number.isFinite(pxPerUnit) && pxPerUnit > 0) {
      const units = niceLength(80 / pxPerUnit);
      const px = units * pxPerUnit;
      const x1 = w - 14, x0 = x1 - px, y = h - 16;
      parts.push(`<path d="M${x0.toFixed(1)} ${y - 4}V${y}H${x1.toFixed(1)}V${y - 4}" fill="none" stroke="#22211e" stroke-width="1.5"/>`);
      parts.push(`<text x="${((x0 + x1) / 2).toFixed(1)}" y="${y - 6}" font-size="10" text-anchor="middle" fill="#22211e" class="scale-text">${units}${this.units ? ` ${this.units.replace(/[<&>]/g, '')}` : ''}</text>`);
    }
    o.setAttribute('width', String(w));
    o.setAttribute('height', String(h));
    o.innerHTML = parts.join('');
  }

  private drawLabels(): void {
    const pattern = this.pattern;
    const opts = this.options;
    const show: number[] = [];
    if (pattern && opts) {
      if (opts.labels) {
        const all = pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
        show.push(...(all.length <= MAX_LABELS ? all : [...opts.drives, ...(opts.selected !== null ? [opts.selected] : [])]));
      } else {
        show.push(...opts.drives);
        if (opts.selected !== null && !opts.drives.includes(opts.selected)) show.push(opts.selected);
      }
    }
    const w = this.width, h = this.height;
    const v = new THREE.Vector3();
    while (this.labelPool.length < show.length) {
      const d = document.createElement('div');
      d.className = 'scene-label';
      this.labelLayer.appendChild(d);
      this.labelPool.push(d);
    }
    this.labelPool.forEach((d, k) => {
      const c = show[k];
      if (c === undefined || !opts) {
        d.style.display = 'none';
        return;
      }
      const lp = this.linePositions;
      v.set((lp[6 * c] + lp[6 * c + 3]) / 2, (lp[6 * c + 1] + lp[6 * c + 4]) / 2, (lp[6 * c + 2] + lp[6 * c + 5]) / 2).project(this.camera);
      if (v.z > 1 || v.z < -1) {
        d.style.display = 'none';
        return;
      }
      d.style.display = '';
      d.style.transform = `translate(${((v.x + 1) / 2) * w}px, ${((1 - v.y) / 2) * h}px)`;
      d.textContent = opts.labelText(c);
      d.classList.toggle('is-drive', opts.drives.includes(c));
      d.classList.toggle('is-selected', opts.selected === c);
    });
  }

  dispose(): void {
    this.disposed = true;
    this.controls.dispose();
    this.geometry.dispose();
    this.lineGeometry.dispose();
    this.markGeometry.dispose();
    this.ghostGeometry.dispose();
    this.renderer.dispose();
    this.renderer.domElement.remove();
    this.labelLayer.remove();
    this.overlay.remove();
  }
}

let software: boolean | undefined;
/** True when WebGL runs on a CPU renderer (SwiftShader, llvmpipe, Microsoft Basic Render). */
export function softwareGl(): boolean {
  if (software === undefined) {
    try {
      const gl = document.createElement('canvas').getContext('webgl');
      const info = gl?.getExtension('WEBGL_debug_renderer_info');
      const name = info && gl ? String(gl.getParameter(info.UNMASKED_RENDERER_WEBGL)) : '';
      software = /swiftshader|llvmpipe|softpipe|basic render/i.test(name);
      gl?.getExtension('WEBGL_lose_context')?.loseContext();
    } catch {
      software = false;
    }
  }
  return software;
}

export function webglAvailable(): boolean {
  try {
    const c = document.createElement('canvas');
    return !!(c.getContext('webgl2') || c.getContext('webgl'));
  } catch {
    return false;
  }
}

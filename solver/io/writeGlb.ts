import { Document, WebIO } from '@gltf-transform/core';
import type { Mesh } from '../mesh/Mesh.ts';
import { vertexNormals } from '../mesh/vertexNormals.ts';

/** sRGB byte → linear float (IEC 61966-2-1), as glTF's COLOR_0 expects linear values. */
export function srgbToLinear(byte: number): number {
  const c = byte / 255;
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

/** linear float → sRGB byte */
export function linearToSrgb(value: number): number {
  const c = value <= 0.0031308 ? 12.92 * value : 1.055 * Math.pow(value, 1 / 2.4) - 0.055;
  return Math.round(Math.max(0, Math.min(1, c)) * 255);
}

/** Application attribute name of a species: glTF 2.0 requires a leading underscore. */
export const glbAttribute = (name: string) => `_${name.toUpperCase()}`;

/**
 * Binary glTF 2.0 (.glb) of a coloured surface: POSITION, NORMAL, COLOR_0
 * (the sRGB vertex colours converted to the linear values glTF specifies) and
 * every per-vertex field as a float application attribute `_NAME` (glTF 2.0
 * §3.7.2.1: application-specific attributes start with an underscore; values
 * beyond single precision's range are clamped to it), with
 * 32-bit triangle indices. Written with @gltf-transform/core.
 */
/** The largest finite single-precision number. */
const FLOAT32_MAX = 3.4028234663852886e38;

export async function writeGlb(mesh: Mesh, options: { colors?: Uint8Array; properties?: Record<string, ArrayLike<number>>; name?: string } = {}): Promise<Uint8Array> {
  const doc = new Document();
  const buffer = doc.createBuffer();
  const n = mesh.positions.length / 3;
  const accessor = (array: Float32Array | Uint32Array, type: 'VEC3' | 'SCALAR') => doc.createAccessor().setArray(array).setType(type).setBuffer(buffer);
  const prim = doc.createPrimitive()
    .setAttribute('POSITION', accessor(Float32Array.from(mesh.positions), 'VEC3'))
    .setAttribute('NORMAL', accessor(Float32Array.from(vertexNormals(mesh)), 'VEC3'))
    .setIndices(accessor(Uint32Array.from(mesh.triangles), 'SCALAR'));
  if (options.colors) {
    const linear = new Float32Array(3 * n);
    for (let i = 0; i < 3 * n; i++) linear[i] = srgbToLinear(options.colors[i]);
    prim.setAttribute('COLOR_0', accessor(linear, 'VEC3'));
  }
  for (const [name, values] of Object.entries(options.properties ?? {})) {
    if (values.length !== n) throw new Error(`writeGlb: "${name}" has ${values.length} values for ${n} vertices`);
    // glTF attributes are single precision: a finite value beyond its range is clamped to the largest float, not made infinite
    prim.setAttribute(glbAttribute(name), accessor(Float32Array.from(values, (v) => (Number.isFinite(v) ? Math.max(-FLOAT32_MAX, Math.min(FLOAT32_MAX, v)) : v)), 'SCALAR'));
  }
  const material = doc.createMaterial('surface').setRoughnessFactor(0.8).setMetallicFactor(0);
  prim.setMaterial(material);
  const gltfMesh = doc.createMesh(options.name ?? 'surface').addPrimitive(prim);
  const node = doc.createNode(options.name ?? 'surface').setMesh(gltfMesh);
  doc.createScene('scene').addChild(node);
  doc.getRoot().getAsset().generator = 'placode';
  return new WebIO().writeBinary(doc);
}

/**
 * One .glb whose animation plays a sequence of frames of one surface (same
 * vertices and triangles, as a growing run's frames between refinements): the
 * first frame is the mesh, every later frame a morph target holding its
 * position and linear-colour differences, and a LINEAR animation of the morph
 * weights visits frame k at time `times[k]` (seconds of playback).
 */
export async function writeAnimatedGlb(frames: { positions: Float64Array; colors: Uint8Array }[], triangles: Uint32Array, times: number[], name = 'surface'): Promise<Uint8Array> {
  if (frames.length < 2) throw new Error('writeAnimatedGlb: give at least two frames');
  const n = frames[0].positions.length / 3;
  for (const f of frames) if (f.positions.length !== 3 * n) throw new Error('writeAnimatedGlb: every frame must have the same vertices (the surface was refined in between)');
  const doc = new Document();
  const buffer = doc.createBuffer();
  const accessor = (array: Float32Array | Uint32Array, type: 'VEC3' | 'SCALAR') => doc.createAccessor().setArray(array).setType(type).setBuffer(buffer);
  const linear = (c: Uint8Array) => Float32Array.from(c, (b) => srgbToLinear(b));
  const basePos = Float32Array.from(frames[0].positions), baseCol = linear(frames[0].colors);
  const prim = doc.createPrimitive()
    .setAttribute('POSITION', accessor(basePos, 'VEC3'))
    .setAttribute('NORMAL', accessor(Float32Array.from(vertexNormals({ positions: frames[0].positions, triangles })), 'VEC3'))
    .setAttribute('COLOR_0', accessor(baseCol, 'VEC3'))
    .setIndices(accessor(Uint32Array.from(triangles), 'SCALAR'))
    .setMaterial(doc.createMaterial('surface').setRoughnessFactor(0.8).setMetallicFactor(0));
  for (let k = 1; k < frames.length; k++) {
    const dp = Float32Array.from(frames[k].positions, (x, i) => Math.fround(x) - basePos[i]);
    const col = linear(frames[k].colors);
    const dc = Float32Array.from(col, (x, i) => x - baseCol[i]);
    const target = doc.createPrimitiveTarget(`frame ${k}`).setAttribute('POSITION', accessor(dp, 'VEC3')).setAttribute('COLOR_0', accessor(dc, 'VEC3'));
    prim.addTarget(target);
  }
  const m = frames.length - 1;
  const mesh = doc.createMesh(name).addPrimitive(prim).setWeights(new Array(m).fill(0));
  const node = doc.createNode(name).setMesh(mesh);
  doc.createScene('scene').addChild(node);
  const weights = new Float32Array(frames.length * m);
  for (let k = 1; k < frames.length; k++) weights[k * m + (k - 1)] = 1;
  const sampler = doc.createAnimationSampler()
    .setInput(doc.createAccessor().setArray(Float32Array.from(times)).setType('SCALAR').setBuffer(buffer))
    .setOutput(doc.createAccessor().setArray(weights).setType('SCALAR').setBuffer(buffer))
    .setInterpolation('LINEAR');
  const channel = doc.createAnimationChannel().setTargetNode(node).setTargetPath('weights').setSampler(sampler);
  doc.createAnimation('growth').addSampler(sampler).addChannel(channel);
  doc.getRoot().getAsset().generator = 'placode';
  return new WebIO().writeBinary(doc);
}

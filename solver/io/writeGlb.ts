import { Document, NodeIO } from '@gltf-transform/core';
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
 * §3.7.2.1: application-specific attributes start with an underscore), with
 * 32-bit triangle indices. Written with @gltf-transform/core.
 */
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
    prim.setAttribute(glbAttribute(name), accessor(Float32Array.from(values), 'SCALAR'));
  }
  const material = doc.createMaterial('surface').setRoughnessFactor(0.8).setMetallicFactor(0);
  prim.setMaterial(material);
  const gltfMesh = doc.createMesh(options.name ?? 'surface').addPrimitive(prim);
  const node = doc.createNode(options.name ?? 'surface').setMesh(gltfMesh);
  doc.createScene('scene').addChild(node);
  doc.getRoot().getAsset().generator = 'placode';
  return new NodeIO().writeBinary(doc);
}

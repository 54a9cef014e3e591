import { describe, expect, it } from 'vitest';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { rectangleGrid } from '../../meshes/shapes/patch.ts';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { buildShape } from '../../meshes/shapes/index.ts';
import { disjointUnion, tetrahedron, translated } from '../fixtures/meshes.ts';

describe('meshTopology', () => {
  it('tetrahedron: V − E + F = 4 − 6 + 4 = 2, genus 0, closed (Euler 1758)', () => {
    const t = meshTopology(tetrahedron());
    expect(t.edgeCount).toBe(6);
    expect(t.eulerCharacteristic).toBe(2);
    expect(t.genus).toBe(0);
    expect(t.boundaryLoops.length).toBe(0);
    expect(t.componentCount).toBe(1);
    expect(t.nonManifoldEdgeCount).toBe(0);
  });

  it('edges are sorted pairs and triangleEdges[3t+k] joins corners k+1 and k+2', () => {
    const mesh = icosphere(3);
    const t = meshTopology(mesh);
    for (let e = 0; e < t.edgeCount; e++) {
      expect(t.edges[2 * e]).toBeLessThan(t.edges[2 * e + 1]);
      if (e > 0) {
        const prev = t.edges[2 * e - 2] * 1e6 + t.edges[2 * e - 1];
        expect(t.edges[2 * e] * 1e6 + t.edges[2 * e + 1]).toBeGreaterThan(prev);
      }
    }
    for (let tri = 0; tri < mesh.triangles.length / 3; tri++) {
      for (let k = 0; k < 3; k++) {
        const e = t.triangleEdges[3 * tri + k];
        const a = mesh.triangles[3 * tri + ((k + 1) % 3)], b = mesh.triangles[3 * tri + ((k + 2) % 3)];
        expect([t.edges[2 * e], t.edges[2 * e + 1]]).toEqual([Math.min(a, b), Math.max(a, b)]);
      }
    }
    // closed triangle mesh: 3F = 2E
    expect(3 * mesh.triangles.length / 3).toBe(2 * t.edgeCount);
  });

  it('a flat rectangle has one boundary loop through every border vertex, χ = 1', () => {
    const t = meshTopology(rectangleGrid(2, 1, 6, 3));
    expect(t.boundaryLoops.length).toBe(1);
    expect(t.boundaryLoops[0].length).toBe(2 * 6 + 2 * 3);
    expect(t.eulerCharacteristic).toBe(1);
    expect(t.genus).toBe(0);
  });

  it('torus has genus 1; two separate spheres are two components of genus 0', () => {
    expect(meshTopology(buildShape({ shape: 'torus', vertices: 500 }).mesh).genus).toBe(1);
    const two = disjointUnion(icosphere(2), translated(icosphere(2), 5));
    const t = meshTopology(two);
    expect(t.componentCount).toBe(2);
    expect(t.eulerCharacteristic).toBe(4);
    expect(t.genus).toBe(0);
  });

  it('vertex neighbour lists are ascending and match the edges', () => {
    const t = meshTopology(icosphere(2));
    for (let v = 0; v < t.vertexCount; v++) {
      for (let s = t.vertexNeighbourOffsets[v] + 1; s < t.vertexNeighbourOffsets[v + 1]; s++) {
        expect(t.vertexNeighbours[s]).toBeGreaterThan(t.vertexNeighbours[s - 1]);
      }
      for (let s = t.vertexNeighbourOffsets[v]; s < t.vertexNeighbourOffsets[v + 1]; s++) {
        const e = t.vertexNeighbourEdges[s];
        const u = t.vertexNeighbours[s];
        expect([t.edges[2 * e], t.edges[2 * e + 1]]).toEqual([Math.min(u, v), Math.max(u, v)]);
      }
    }
  });

  it('is cached per triangles array and shared by a moved mesh', () => {
    const m = icosphere(2);
    const moved = { positions: m.positions.map((x) => 2 * x), triangles: m.triangles };
    expect(meshTopology(moved)).toBe(meshTopology(m));
  });
});

import type { Mesh } from '../mesh/Mesh.ts';
import { writePly } from './writePly.ts';
import { writeObj } from './writeObj.ts';
import { writeGlb } from './writeGlb.ts';
import { speciesProperty } from '../run/runFiles.ts';

export type SnapshotFormat = 'ply' | 'glb' | 'obj' | 'csv';
export const SNAPSHOT_FORMATS: readonly SnapshotFormat[] = ['ply', 'glb', 'obj', 'csv'];

/**
 * One state of a surface in an exchange format: PLY (colours and every species
 * as `species_<name>` floats), binary glTF (COLOR_0 linear, species as `_NAME`
 * attributes), OBJ with `v x y z r g b` colours, or CSV of x, y, z and the species.
 */
export async function encodeSnapshot(format: SnapshotFormat, mesh: Mesh, fields: Record<string, Float64Array>, colors: Uint8Array, comment: string, ascii = false): Promise<Uint8Array | string> {
  switch (format) {
    case 'ply':
      return writePly(mesh, { encoding: ascii ? 'ascii' : 'binary', colors, properties: Object.fromEntries(Object.entries(fields).map(([k, v]) => [speciesProperty(k), v])), comments: [comment] });
    case 'obj':
      return writeObj(mesh, { colors, comment });
    case 'glb':
      return writeGlb(mesh, { colors, properties: fields });
    case 'csv': {
      const names = Object.keys(fields);
      const rows = [['x', 'y', 'z', ...names].join(',')];
      const p = mesh.positions;
      for (let i = 0; i < p.length / 3; i++) rows.push([p[3 * i], p[3 * i + 1], p[3 * i + 2], ...names.map((k) => fields[k][i])].join(','));
      return rows.join('\n') + '\n';
    }
  }
}

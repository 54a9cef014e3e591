/** Exports of what is shown: the picture with its colour bar (PNG), the coloured mesh (PLY, GLB). */
import type { SurfaceView } from './SurfaceView.ts';
import type { Frame } from './appState.ts';
import type { Painting } from './painting.ts';
import { drawColorBar } from './colorBar.ts';
import { download } from './dom.ts';
import { colorizeField } from '../../solver/io/colormap.ts';
import { encodeSnapshot } from '../../solver/io/encodeSnapshot.ts';

/** The view rendered at w × h with the colour bar at a whole-pixel scale on white (every row of the bar one colour of the map). */
export function exportPicture(view: SurfaceView, w: number, h: number, p: Painting | undefined): void {
  const picture = view.renderAt(w, h);
  if (p) {
    const scale = Math.max(1, Math.round(h / 700));
    const bar = document.createElement('canvas');
    drawColorBar(bar, p.colormap, p.range, p.label, scale, '#ffffff');
    picture.getContext('2d')!.drawImage(bar, Math.round(w - bar.width - 10 * scale), Math.round((h - bar.height) / 2));
  }
  picture.toBlob((blob) => { if (blob) download('placode-view.png', blob, 'image/png'); }, 'image/png');
}

/** The coloured mesh as shown (colours as on screen; every species, and a painted eigenmode, as properties). */
export async function exportColouredMesh(format: 'ply' | 'glb', frame: Frame, p: Painting, modeIndex: number | undefined): Promise<void> {
  const fields = p.showMode ? { ...frame.fields, [`mode${modeIndex}`]: p.values } : frame.fields;
  const bytes = await encodeSnapshot(format, frame.mesh, fields, colorizeField(p.values, p.colormap, p.range), `placode viewer, t = ${frame.time}`);
  download(`placode-view.${format}`, bytes as BlobPart, format === 'glb' ? 'model/gltf-binary' : 'application/octet-stream');
}

import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { RUN_FILES } from '../run/runFiles.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import type { FigurePanel } from '../io/surfaceFigure.ts';
import { surfaceFigurePng } from '../io/surfaceFigurePng.ts';
import { axisValues } from './expandSweep.ts';
import { snapshotField } from '../run/runFrames.ts';
import { colormapOption, fixedRangeOption, viewOption } from '../io/paintingOptions.ts';
import { DEFAULT_COLORMAP, DEFAULT_VIEW, SHEET_THUMBNAIL } from '../defaults.ts';
import { readManifest } from './sweepPlan.ts';
import { runStatus } from './sweepTask.ts';
import { peekRunRecord } from '../run/runDirectory.ts';

export interface CollectOptions {
  /** CSV file (default DIR/sweep.csv) */
  csv?: string;
  /** contact sheet PNG (default DIR/sheet.png); false: none */
  sheet?: string | false;
  species?: string;
  colormap?: string;
  /** colour range of the sheet: min:max (default: over every run shown) */
  range?: string;
  view?: string;
  /** width of one thumbnail in pixels (default 220) */
  thumbnail?: number;
}

/** A CSV field (RFC 4180): quoted when it holds a comma, quote or line break. */
function csvField(v: unknown): string {
  if (v === undefined || v === null) return '';
  const s = typeof v === 'string' ? v : typeof v === 'number' || typeof v === 'boolean' ? String(v) : JSON.stringify(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/**
 * `placode sweep collect`: one CSV row per run (its varied values, state,
 * stop, timings, the linear-stability prediction on its surface, the final
 * pattern measures and the final metrics row) and a contact sheet of every
 * run's final pattern, laid out on the parameter grid (the last varied axis
 * across, the others down) on one colour scale and one length scale.
 */
export function collectSweep(dirArg: string, o: CollectOptions = {}): { csv: string; sheet?: string; rows: number; missing: number } {
  const { dir, entries, plan } = readManifest(dirArg);
  const paths = Object.keys(plan.vary);
  const metricHeaders: string[] = [];
  const rows: Record<string, unknown>[] = [];
  const panels: FigurePanel[] = [];
  let species = o.species;
  let missing = 0;
  for (const e of entries) {
    const read = peekRunRecord(join(dir, e.run));
    const status = runStatus(dir, e, { record: read });
    const record = read ?? undefined;
    const run = join(dir, e.run);
    const row: Record<string, unknown> = { index: e.index, id: e.id, state: status.state };
    for (const p of paths) row[p] = e.values[p];
    if (status.state === 'failed') row.message = status.message?.trim().replace(/\s*\n\s*/g, ' | '); // the whole message, on one line
    if (record) {
      row.stop = record.stop?.reason;
      row.time = record.stop?.time;
      row.steps = record.stop?.step;
      row.seconds = record.performance?.steppingSeconds;
      const pr = record.analysis?.prediction;
      row.band_low = pr?.band?.[0];
      row.band_high = pr?.band?.[1];
      row.fastest_k2 = pr?.fastest?.k2;
      row.fastest_rate = pr?.fastest?.rate;
      row.predicted_mode = pr?.predicted?.index;
      row.predicted_eigenvalue = pr?.predicted?.eigenvalue;
      row.predicted_multiplicity = pr?.predicted?.multiplicity;
      const last = record.analysis?.frames[record.analysis.frames.length - 1];
      if (last) {
        row.patches = last.patches.length;
        row.mean_patch_area = last.patches.length ? last.patches.reduce((a, p) => a + p.area, 0) / last.patches.length : undefined;
        row.dominant_eigenvalue = last.dominantEigenvalue;
        row.dominant_fraction = last.dominantFraction;
      }
      species ??= record.analysis?.species;
    }
    const metricsFile = join(run, RUN_FILES.metrics);
    if (existsSync(metricsFile)) {
      const lines = readFileSync(metricsFile, 'utf8').trim().split('\n');
      if (lines.length > 1) {
        const header = lines[0].split(',');
        const values = lines[lines.length - 1].split(',');
        header.forEach((h, k) => {
          const key = `final_${h}`;
          if (!metricHeaders.includes(key)) metricHeaders.push(key);
          row[key] = values[k] === '' ? undefined : Number(values[k]);
        });
      }
    }
    rows.push(row);
    const finalFile = join(run, RUN_FILES.final);
    if (o.sheet !== false && status.state === 'done' && existsSync(finalFile)) {
      const field = snapshotField(finalFile, species);
      species = field.species;
      panels.push({ mesh: field.mesh, values: field.values, label: e.label });
    } else {
      if (status.state !== 'done') missing++;
      panels.push({ label: `${e.label} (${status.state})` });
    }
  }
  const columns = ['index', 'id', 'state', ...paths, 'message', 'stop', 'time', 'steps', 'seconds', 'band_low', 'band_high', 'fastest_k2', 'fastest_rate', 'predicted_mode', 'predicted_eigenvalue', 'predicted_multiplicity', 'patches', 'mean_patch_area', 'dominant_eigenvalue', 'dominant_fraction', ...metricHeaders];
  const csv = o.csv ?? join(dir, 'sweep.csv');
  writeFileAtomic(csv, [columns.map(csvField).join(','), ...rows.map((r) => columns.map((c) => csvField(r[c])).join(','))].join('\n') + '\n', true);
  if (o.sheet === false) return { csv, rows: rows.length, missing };
  const shown = panels.filter((p) => p.mesh);
  if (!shown.length) return { csv, rows: rows.length, missing };
  const colormap = colormapOption(o.colormap ?? DEFAULT_COLORMAP);
  const range = o.range ? fixedRangeOption(o.range, 'min:max with max > min') : undefined;
  const view = viewOption(o.view ?? DEFAULT_VIEW, true);
  // the grid: the last axis across (it varies fastest in the manifest), unless points were dropped or drawn at random
  const lastAxis = plan.varying[plan.varying.length - 1];
  const across = plan.design === 'grid' && !plan.duplicatesDropped && lastAxis ? axisValues(plan.vary[lastAxis]).length : Math.ceil(Math.sqrt(panels.length));
  const columnsOnSheet = Math.max(1, Math.min(across, panels.length));
  const rowsOnSheet = Math.ceil(panels.length / columnsOnSheet);
  const thumb = o.thumbnail ?? SHEET_THUMBNAIL;
  // type at 96 dpi: 9-point captions are 12 pixels, in the 24 left under each thumbnail
  const width = Math.min(8000, columnsOnSheet * thumb + 150);
  const height = Math.min(8000, rowsOnSheet * (thumb + 24) + 60);
  const sheet = o.sheet ?? join(dir, 'sheet.png');
  writeFileAtomic(sheet, surfaceFigurePng({ panels, columns: columnsOnSheet, species: species ?? '', colormap, range, view, title: `${plan.name}: ${plan.varying.map((p) => p.split('.').pop()).join(' × ')}`, width, height, dpi: 96 }), true);
  return { csv, sheet, rows: rows.length, missing };
}

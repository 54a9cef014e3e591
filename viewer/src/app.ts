/// <reference types="vite/client" />
/**
 * The Placode viewer: scenario on the left, the surface in the centre,
 * stability, timeline and export below. The solver runs in a Web Worker
 * (simulationWorker.ts); this module draws, brushes and keeps the timeline.
 */
import { SurfaceView } from './SurfaceView.ts';
import { ScenarioForm } from './scenarioForm.ts';
import { showStability } from './stabilityPanel.ts';
import { app, frameOf, type Frame } from './appState.ts';
import { say, notice, clearNotice, clearProblems } from './messages.ts';
import { drawColorBar } from './colorBar.ts';
import { el, byId, download, fmt } from './dom.ts';
import type { FromSimulation, ToSimulation, FromAnalysis, ToAnalysis } from './protocol.ts';
import { colorizeField, COLORMAP_NAMES, type ColormapName } from '../../solver/io/colormap.ts';
import { parseMeshFile } from '../../solver/io/parseMeshFile.ts';
import { meshStatistics } from '../../solver/mesh/meshStatistics.ts';
import { speciesFromProperties } from '../../solver/run/runFiles.ts';
import type { MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { VIEWER_PAINT_INTERVAL_MS } from '../../solver/defaults.ts';
import { PaintPacer } from './paintPacer.ts';
import { paintingOf, TINY_CONTRAST, type Painting } from './painting.ts';
import { exportPicture, exportColouredMesh } from './viewExport.ts';

/** The example the viewer opens on. */
const FIRST_EXAMPLE = 'limb-paddle-growing';
const EXAMPLES = import.meta.glob('../../meshes/examples/*.yaml', { query: '?raw', import: 'default', eager: true }) as Record<string, string>;

const worker = new Worker(new URL('./simulationWorker.ts', import.meta.url), { type: 'module' });
const send = (m: ToSimulation, transfer: Transferable[] = []) => worker.postMessage(m, transfer);

/** Scenarios sent to the simulation worker and not yet answered, oldest first (it answers in order). */
const pendingLoads: { text: string; files: Record<string, MeshFileContents> }[] = [];

// ---- the analysis worker: replaced (so cancelled) when a new scenario is set up while it works
let analysis: Worker | undefined;
let analysing = false;
function analyse(text: string, files: Record<string, MeshFileContents>) {
  if (analysis && analysing) {
    analysis.terminate();
    analysis = undefined;
  }
  if (!analysis) {
    analysis = new Worker(new URL('./analysisWorker.ts', import.meta.url), { type: 'module' });
    analysis.onmessage = (event: MessageEvent<FromAnalysis>) => onAnalysis(event.data);
    analysis.onerror = (e) => { analysing = false; say(`the analysis worker failed: ${e.message}`, 'error'); };
  }
  analysing = true;
  const m: ToAnalysis = { type: 'analyse', text, files };
  analysis.postMessage(m);
}
const askMode = (index: number) => analysis?.postMessage({ type: 'mode', index } satisfies ToAnalysis);

function onAnalysis(m: FromAnalysis) {
  switch (m.type) {
    case 'stability':
      analysing = false;
      app.stability = m.view;
      showStability(m.view, askMode);
      break;
    case 'mode':
      mode = { index: m.index, eigenvalue: m.eigenvalue, values: m.values };
      app.view = 'mode';
      shown = live;
      paint();
      break;
    case 'error':
      analysing = false;
      say(m.message, 'error');
      break;
  }
}

const view = new SurfaceView(byId('stage'));
app.webgl = view.gl;
const openedFiles: Record<string, MeshFileContents> = {};
const form = new ScenarioForm(() => { byId('setup').classList.add('pending'); if (app.ready) status(); });
byId('scenario-panel').append(form.root);

// ---- live state and what is shown
let live: Frame | undefined;
let timeline: Frame[] = [];
let timelineSource: 'live' | 'server' = 'live';
let shown: Frame | undefined;
let mode: { index: number; eigenvalue: number; values: Float64Array } | undefined;
let shownTriangles: Uint32Array | undefined;
let shownPositions: Float64Array | undefined;
let runRange: [number, number] | undefined;
/** the shown surface's extent, recomputed only when it moves */
let shownExtent: { positions?: Float64Array; value: number } = { value: 0 };
let rest: (number | null)[] = [];

const speciesSelect = byId<HTMLSelectElement>('paint-species');
const colormapSelect = byId<HTMLSelectElement>('paint-colormap');
const rangeSelect = byId<HTMLSelectElement>('paint-range');
for (const c of COLORMAP_NAMES) colormapSelect.append(el('option', { value: c, text: c }));

function setSpecies(names: string[], preferred?: string) {
  const before = speciesSelect.value;
  speciesSelect.replaceChildren(...names.map((s) => el('option', { value: s, text: s })));
  speciesSelect.value = names.includes(before) ? before : preferred && names.includes(preferred) ? preferred : names[names.length - 1];
}

/** The frame shown: the live one, or one of the timeline (an eigenmode is painted on the live one). */
const shownFrame = () => (app.view === 'live' ? live : shown);

/** What is painted on a frame, as the toolbar asks. */
function painting(frame: Frame): Painting | undefined {
  const choice = rangeSelect.value as 'frame' | 'run' | 'fixed';
  return paintingOf(frame.fields, {
    mode: app.view === 'mode' ? mode : undefined,
    species: speciesSelect.value,
    colormap: colormapSelect.value as ColormapName,
    range: choice,
    fixed: [Number(byId<HTMLInputElement>('range-min').value), Number(byId<HTMLInputElement>('range-max').value)],
    runRange,
  });
}

/** Paint what is shown: a frame (live or recorded) or an eigenmode. */
function paint() {
  const frame = shownFrame();
  if (!frame) return;
  if (frame.mesh.triangles !== shownTriangles) {
    const reframe = shownTriangles === undefined;
    shownTriangles = frame.mesh.triangles;
    shownPositions = frame.mesh.positions;
    view.setSurface(frame.mesh.positions, frame.mesh.triangles, reframe);
  } else if (frame.mesh.positions !== shownPositions) {
    shownPositions = frame.mesh.positions;
    view.movePositions(frame.mesh.positions);
  }
  const p = painting(frame);
  if (!p) return;
  if (rangeSelect.value === 'run' && !p.showMode) runRange = p.range; // the range grows with every frame shown
  view.setColors(colorizeField(p.values, p.colormap, p.range));
  drawColorBar(byId<HTMLCanvasElement>('colorbar'), p.colormap, p.range, p.label);
  let sum = 0;
  for (let i = 0; i < p.values.length; i++) sum += p.values[i];
  if (shownExtent.positions !== frame.mesh.positions) shownExtent = { positions: frame.mesh.positions, value: extent(frame.mesh.positions) };
  app.shown = { species: p.label, min: p.own[0], mean: sum / p.values.length, max: p.own[1], vertices: frame.mesh.positions.length / 3, extent: shownExtent.value, time: frame.time, range: p.range };
  const tiny = !p.showMode && p.relative !== undefined && p.relative < TINY_CONTRAST ? ` · ${p.label} varies by ${p.relative === 0 ? 'nothing' : `${fmt(100 * p.relative)} %`} of its size: no pattern yet` : '';
  byId('view-caption').textContent = p.showMode ? `eigenmode ${mode!.index}, λ = ${fmt(mode!.eigenvalue)}` : `${timelineSource === 'server' && app.view === 'frame' ? 'recorded run' : app.view === 'frame' ? 'timeline' : 'live'} · t = ${fmt(frame.time)}${tiny}`;
}

for (const id of ['paint-species', 'paint-colormap', 'paint-range', 'range-min', 'range-max']) byId(id).addEventListener('input', () => { runRange = undefined; paint(); });
rangeSelect.addEventListener('input', () => { byId('fixed-range').hidden = rangeSelect.value !== 'fixed'; });
byId<HTMLInputElement>('wireframe').addEventListener('change', (e) => view.setWireframe((e.target as HTMLInputElement).checked));

// ---- status line
function status() {
  const recorded = app.view === 'frame' && timelineSource === 'server';
  const frame = shownFrame();
  byId('status-state').textContent = recorded ? `recorded run ${runName}` : app.running ? 'running' : app.loaded ? (app.step > 0 ? 'paused' : 'set up') : 'not set up';
  byId('status-time').textContent = `t = ${fmt(recorded && frame ? frame.time : app.time)}`;
  byId('status-steps').textContent = recorded ? `frame ${Number(byId<HTMLInputElement>('timeline-slider').value) + 1} of ${timeline.length}` : `${app.step} steps`;
  byId('status-vertices').textContent = `${recorded && frame ? frame.mesh.positions.length / 3 : app.vertices} vertices`;
  byId('status-rate').textContent = app.running ? `${fmt(app.stepsPerSecond)} steps/s` : app.loaded ? 'paused' : 'not set up';
  byId('run').textContent = app.running ? 'Pause' : 'Start';
  // the first steps: tissue and mechanism in the form, then Set up, then Start
  // (the form always holds a tissue and a mechanism; a change not set up yet makes Set up the next step again)
  const next = !app.loaded || byId('setup').classList.contains('pending') ? 2 : app.step > 0 || app.running ? 4 : 3;
  document.querySelectorAll<HTMLElement>('#guide li').forEach((li, k) => {
    li.classList.toggle('done', k < next);
    li.classList.toggle('current', k === next);
  });
  byId('run').classList.toggle('primary', app.loaded);
}

// ---- the worker's messages
worker.onmessage = (event: MessageEvent<FromSimulation>) => {
  const m = event.data;
  switch (m.type) {
    case 'loaded': {
      const accepted = pendingLoads.shift();
      if (accepted) analyse(accepted.text, accepted.files);
      clearProblems();
      app.loaded = true;
      app.running = false;
      app.species = m.species;
      app.vertices = m.stats.vertices;
      app.time = 0;
      app.step = 0;
      rest = m.rest;
      speciesSelect.value = '';
      setSpecies(m.species, m.colour);
      colormapSelect.value = m.colormap;
      if (m.range === 'frame') rangeSelect.value = 'frame';
      else {
        rangeSelect.value = 'fixed';
        byId<HTMLInputElement>('range-min').value = String(m.range[0]);
        byId<HTMLInputElement>('range-max').value = String(m.range[1]);
      }
      byId('fixed-range').hidden = rangeSelect.value !== 'fixed';
      live = frameOf(0, { positions: m.positions, triangles: m.triangles }, m.state, m.species);
      timeline = [live];
      timelineSource = 'live';
      runRange = undefined;
      app.view = 'live';
      mode = undefined;
      shownTriangles = undefined;
      byId('setup').classList.remove('pending');
      app.stability = null;
      byId('stability-summary').replaceChildren(el('p', { text: 'computing the surface\'s eigenmodes…' }));
      byId('mode-list').replaceChildren();
      byId('dispersion').replaceChildren();
      const s = m.stats;
      const u = s.units ? ` ${s.units}` : '';
      byId('tissue-stats').textContent = `${s.vertices} vertices · ${s.triangles} triangles · area ${fmt(s.area)}${s.units ? ` ${s.units}²` : ''} · genus ${Number.isNaN(s.genus) ? "none (not an orientable manifold)" : s.genus} · ${s.boundaryLoops} boundary loop(s) · ${s.components} component(s) · mean edge ${fmt(s.meanEdge)}${u}`;
      byId('clock-stats').textContent = `${m.scheme}${m.scheme === 'imex' ? ` (${m.solver})` : ''}, dt = ${fmt(m.dt)}, to t = ${fmt(m.end)}, a frame every ${fmt(m.every)}${m.growing ? ', growing' : ''}, ${m.threads.used} thread${m.threads.used > 1 ? 's' : ''}`;
      app.threads = m.threads.used;
      for (const w of [...m.notes, ...m.warnings]) say(w, 'warning');
      if (m.threads.note) say(m.threads.note);
      say(`set up: ${m.species.join(', ')} on ${s.vertices} vertices`);
      updateTimeline();
      paint();
      status();
      break;
    }
    case 'problems': {
      pendingLoads.shift();
      const box = byId('problems');
      box.replaceChildren(el('p', { class: 'error', text: 'The scenario was not set up; the current one is unchanged:' }), ...m.problems.map((p) => el('p', { class: 'error', text: `${p.line !== undefined ? `line ${p.line}: ` : ''}${p.path ? `${p.path}: ` : ''}${p.message}` })));
      app.problems = m.problems.map((p) => `${p.path}: ${p.message}`);
      break;
    }
    case 'frame': {
      const mesh = m.positions ? { positions: m.positions, triangles: m.triangles ?? live!.mesh.triangles } : live!.mesh;
      live = frameOf(m.time, mesh, m.state, app.species);
      app.time = m.time;
      app.step = m.step;
      app.running = m.running;
      app.stepsPerSecond = m.stepsPerSecond;
      app.vertices = mesh.positions.length / 3;
      byId('status-growth').textContent = `growth ×${m.growthFactor.toFixed(3)}`;
      if (m.keep && timelineSource === 'live') {
        if (timeline[timeline.length - 1]?.time !== m.time) timeline.push(live);
        thinTimeline();
        timelineChanged = true;
      }
      livePaint.request();
      break;
    }
    case 'stopped':
      app.running = false;
      livePaint.now();
      say(m.message, m.reason === 'end' || m.reason === 'steady-state' ? 'info' : 'error');
      status();
      break;
    case 'error':
      notice('transport-notice', m.message);
      app.running = false;
      status();
      break;
  }
};
worker.onerror = (e) => say(`the simulation worker failed: ${e.message}`, 'error');

/**
 * The live simulation is painted at most every VIEWER_PAINT_INTERVAL_MS, the
 * latest frame only, and no more often than keeps drawing under a fifth of the
 * page's time (software WebGL on a busy machine); then the worker may send the next.
 */
let timelineChanged = false;
const livePaint = new PaintPacer(() => (app.paintIntervalMs = Math.min(1000, Math.max(VIEWER_PAINT_INTERVAL_MS, 5 * view.frameCostMs))), () => {
  if (timelineChanged) updateTimeline();
  timelineChanged = false;
  if (app.view === 'live') paint();
  status();
  app.paints++;
  send({ type: 'ack' });
});

/** Largest distance of a vertex from the centroid. */
function extent(p: Float64Array): number {
  const n = p.length / 3;
  let cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < n; i++) { cx += p[3 * i]; cy += p[3 * i + 1]; cz += p[3 * i + 2]; }
  cx /= n; cy /= n; cz /= n;
  let r = 0;
  for (let i = 0; i < n; i++) r = Math.max(r, Math.hypot(p[3 * i] - cx, p[3 * i + 1] - cy, p[3 * i + 2] - cz));
  return r;
}

/** Keep the timeline under ~400 MB: drop every other frame (the first and last stay). */
function thinTimeline() {
  const bytes = timeline.reduce((a, f) => a + Object.values(f.fields).reduce((b, v) => b + v.byteLength, 0), 0);
  if (bytes < 400e6) return;
  timeline = timeline.filter((_, i) => i % 2 === 0 || i === timeline.length - 1);
  say('the timeline keeps every other frame from now on (memory)', 'warning');
}

// ---- transport
byId('run').addEventListener('click', () => {
  if (!app.loaded) return notice('transport-notice', 'Nothing to start yet: choose the tissue and the mechanism on the left, then press “Set up”.');
  clearNotice('transport-notice');
  if (app.running) send({ type: 'pause' });
  else {
    app.view = 'live';
    send({ type: 'run' });
    app.running = true;
  }
  status();
});
byId('step').addEventListener('click', () => {
  if (!app.loaded) return notice('transport-notice', 'Nothing to step yet: press “Set up” first.');
  app.view = 'live';
  send({ type: 'step', steps: Number(byId<HTMLInputElement>('step-count').value) || 1 });
});
byId('reset').addEventListener('click', () => {
  if (!app.loaded) return;
  timeline = [];
  timelineSource = 'live';
  runRange = undefined;
  app.view = 'live';
  send({ type: 'reset' });
  updateTimeline();
});
byId('setup').addEventListener('click', () => setUp());
form.root.querySelector('#use-text')!.addEventListener('click', () => { form.useText(); setUp(); });

function setUp() {
  const text = form.scenarioText();
  byId('problems').replaceChildren(el('p', { class: 'info', text: 'setting up: building the mesh and checking the scenario…' }));
  pendingLoads.push({ text, files: { ...openedFiles } });
  send({ type: 'load', text, files: openedFiles });
}

// ---- examples
const exampleSelect = byId<HTMLSelectElement>('example');
for (const path of Object.keys(EXAMPLES).sort()) {
  const name = path.split('/').pop()!.replace(/\.yaml$/, '');
  // sweeps are for the command line; examples that read mesh files (stage meshes) need them opened first
  if (name.endsWith('-sweep') || /^mesh:\s*(\{\s*file:|\n\s+file:)/m.test(EXAMPLES[path])) continue;
  exampleSelect.append(el('option', { value: path, text: name }));
}
exampleSelect.addEventListener('change', () => {
  if (!exampleSelect.value) return;
  form.showScenario(EXAMPLES[exampleSelect.value]);
  setUp();
});

// ---- mesh files: the button and drag-and-drop
async function openMeshFile(file: File) {
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await file.arrayBuffer());
  } catch (e) {
    return say(`${file.name}: cannot be read (${(e as Error).message})`, 'error');
  }
  try {
    const imported = parseMeshFile(bytes, file.name);
    const stats = meshStatistics(imported.mesh);
    if (stats.errors.length) {
      return say(`${file.name} cannot be used for surface finite elements: ${stats.errors.join('; ')}. Nothing was changed; repair it (placode mesh ${file.name} --weld --fix-orientation -o fixed.ply) and open the result.`, 'error');
    }
    openedFiles[file.name] = { mesh: imported.mesh, vertexData: imported.vertexData, notes: imported.notes, source: { file: file.name } };
    for (const w of [...imported.notes, ...stats.warnings]) say(`${file.name}: ${w}`, 'warning');
    say(`opened ${file.name}: ${stats.vertices} vertices, ${stats.triangles} triangles, genus ${Number.isNaN(stats.genus) ? "none (not an orientable manifold)" : stats.genus}, ${stats.boundaryLoops} boundary loop(s)`);
    form.setMesh({ name: file.name, vertices: stats.vertices });
    setUp();
  } catch (e) {
    say(`${file.name}: ${(e as Error).message}. Nothing was changed.`, 'error');
  }
}
byId<HTMLInputElement>('open-mesh').addEventListener('change', (e) => {
  const f = (e.target as HTMLInputElement).files?.[0];
  if (f) void openMeshFile(f);
  (e.target as HTMLInputElement).value = '';
});
const stage = byId('stage');
stage.addEventListener('dragover', (e) => { e.preventDefault(); stage.classList.add('drop'); });
stage.addEventListener('dragleave', () => stage.classList.remove('drop'));
stage.addEventListener('drop', (e) => {
  e.preventDefault();
  stage.classList.remove('drop');
  const f = e.dataTransfer?.files?.[0];
  if (f) void openMeshFile(f);
});

// ---- brush
function setTool(tool: 'off' | 'seed' | 'erase') {
  view.setBrush(tool);
  for (const t of ['off', 'seed', 'erase']) {
    byId(`tool-${t}`).classList.toggle('active', t === tool);
    byId(`tool-${t}`).setAttribute('aria-pressed', String(t === tool));
  }
}
for (const t of ['off', 'seed', 'erase'] as const) byId(`tool-${t}`).addEventListener('click', () => setTool(t));
byId<HTMLInputElement>('brush-size').addEventListener('input', (e) => { view.brushRadius = Number((e.target as HTMLInputElement).value) / 100; });
view.onStroke = (stroke) => {
  app.brushMs = view.lastBrushMs;
  if (!app.loaded) return notice('toolbar-notice', 'The brushes act on a set-up tissue: press “Set up” first.', 'warning');
  if (app.view !== 'live') return notice('toolbar-notice', 'The brushes act on the live state: press “Show live” first.', 'warning');
  const values = view.brushing === 'seed' ? form.spotValuesBySpecies() : rest;
  if (view.brushing === 'seed' && values.every((v) => v === null)) return notice('toolbar-notice', 'Give the spot values (Start section, left) that Induce paints.');
  clearNotice('toolbar-notice');
  send({ type: 'brush', vertices: stroke.vertices, weights: stroke.weights, mode: view.brushing === 'erase' ? 'erase' : 'seed', values }, [stroke.vertices.buffer, stroke.weights.buffer]);
  app.strokes++;
};

byId('show-live').addEventListener('click', () => { app.view = 'live'; timelineSource = timelineSource === 'server' ? 'server' : 'live'; paint(); });

// ---- timeline
const slider = byId<HTMLInputElement>('timeline-slider');
function updateTimeline() {
  app.frames = timeline.length;
  slider.max = String(Math.max(0, timeline.length - 1));
  if (app.view !== 'frame') slider.value = slider.max;
  byId('timeline-label').textContent = timeline.length ? `${timeline.length} frame(s) of the ${timelineSource === 'server' ? `recorded run ${runName}` : 'current run'}` : 'no frames yet';
}
async function showFrame(index: number) {
  const f = timeline[index];
  if (!f) return;
  if (f.file) {
    try {
      const res = await fetch(`run/${f.file}`);
      if (!res.ok) throw new Error(`${res.status} ${res.statusText}`);
      const imported = parseMeshFile(new Uint8Array(await res.arrayBuffer()), f.file);
      f.mesh = imported.mesh;
      f.fields = speciesFromProperties(imported.vertexData);
      f.file = undefined;
    } catch (e) {
      return say(`cannot load ${f.file}: ${(e as Error).message}`, 'error');
    }
  }
  shown = f;
  app.view = 'frame';
  slider.value = String(index);
  if (timelineSource === 'server') setSpecies(Object.keys(f.fields), preferredSpecies);
  byId('timeline-label').textContent = `frame ${index + 1} of ${timeline.length}, t = ${fmt(f.time)}`;
  paint();
  status();
}
slider.addEventListener('input', () => void showFrame(Number(slider.value)));
byId('load-run').addEventListener('click', () => void loadServerRun());
/** the scenario text of the run directory on the timeline (from its record), and the species it painted */
let runScenarioText: string | undefined;
let preferredSpecies: string | undefined;
let runName = '';
byId('run-scenario').addEventListener('click', () => {
  if (!runScenarioText) return;
  form.useText(runScenarioText);
  say('the run\'s scenario is in the text box; press “Set up from text” to run it here (a mesh file it names must be opened first)');
});

async function loadServerRun() {
  let info: { name: string; frames: { file: string; time: number }[]; final?: string; scenarioText?: string; output?: { colour?: string; colormap?: string; range?: [number, number] | 'frame' } };
  try {
    const res = await fetch('api/run');
    if (!res.ok) throw new Error(`${res.status} ${res.statusText}`);
    const body = await res.json();
    if (!body.run) return say('no run directory was given: start the viewer with placode view RUNDIR', 'error');
    info = body.run;
  } catch (e) {
    return say(`cannot list the run: ${(e as Error).message}`, 'error');
  }
  if (app.running) send({ type: 'pause' });
  const empty: Mesh = { positions: new Float64Array(0), triangles: new Uint32Array(0) };
  timeline = info.frames.map((f) => ({ time: f.time, mesh: empty, fields: {}, file: f.file }));
  timelineSource = 'server';
  runName = info.name;
  runRange = undefined;
  shownTriangles = undefined;
  updateTimeline();
  runScenarioText = info.scenarioText;
  byId('run-scenario').hidden = !runScenarioText;
  // painted as the run painted its frames: species, colormap and a fixed range
  if (info.output?.colormap && (COLORMAP_NAMES as string[]).includes(info.output.colormap)) colormapSelect.value = info.output.colormap;
  preferredSpecies = info.output?.colour;
  const range = info.output?.range;
  if (Array.isArray(range) && range.length === 2) {
    rangeSelect.value = 'fixed';
    byId<HTMLInputElement>('range-min').value = String(range[0]);
    byId<HTMLInputElement>('range-max').value = String(range[1]);
  }
  byId('fixed-range').hidden = rangeSelect.value !== 'fixed';
  speciesSelect.value = '';
  // frame the camera on the last frame (a growing run's largest), then show the first
  await showFrame(timeline.length - 1);
  await showFrame(0);
  app.serverRun = { name: info.name, frames: timeline.length };
  // the form describes this run: its scenario read into the fields (read-only where the form cannot hold it)
  if (runScenarioText) form.showScenario(runScenarioText);
  say(`loaded run ${info.name}: ${timeline.length} frames`);
}

// ---- export: the view as a picture (with its colour bar), the coloured mesh as shown
byId('export-png').addEventListener('click', () => {
  const w = Math.round(Number(byId<HTMLInputElement>('png-width').value)), h = Math.round(Number(byId<HTMLInputElement>('png-height').value));
  if (!(w >= 64 && h >= 64 && w <= 8192 && h <= 8192)) return say('PNG size: width and height from 64 to 8192 pixels', 'error');
  const frame = shownFrame();
  exportPicture(view, w, h, frame && painting(frame));
});
async function exportMesh(format: 'ply' | 'glb') {
  const frame = shownFrame();
  const p = frame && painting(frame);
  if (!frame || !p) return say('nothing to export yet', 'error');
  await exportColouredMesh(format, frame, p, mode?.index);
}
byId('export-ply').addEventListener('click', () => void exportMesh('ply'));
byId('export-glb').addEventListener('click', () => void exportMesh('glb'));
byId('save-scenario').addEventListener('click', () => download('scenario.yaml', form.scenarioText(), 'text/yaml'));

// ---- keys: space starts and pauses, "." takes the steps of the Step button (not while typing)
document.addEventListener('keydown', (e) => {
  const t = e.target as HTMLElement;
  if (e.ctrlKey || e.metaKey || e.altKey || t.closest('input, textarea, select, [contenteditable]')) return;
  if (e.key === ' ') { e.preventDefault(); byId('run').click(); }
  else if (e.key === '.') byId('step').click();
});

// ---- tabs
for (const tab of document.querySelectorAll<HTMLButtonElement>('[data-tab]')) {
  tab.addEventListener('click', () => {
    for (const t of document.querySelectorAll<HTMLButtonElement>('[data-tab]')) t.classList.toggle('active', t === tab);
    for (const p of document.querySelectorAll<HTMLElement>('.tab-panel')) p.hidden = p.id !== tab.dataset.tab;
  });
}

// ---- start: a run directory given to `placode view`, else the form's scenario
(async () => {
  const res = await fetch('api/run').then((r) => r.json()).catch(() => undefined);
  if (res?.run) {
    byId('load-run').hidden = false;
    await loadServerRun();
    (document.querySelector('[data-tab="timeline-panel"]') as HTMLButtonElement).click();
  } else {
    byId('load-run').hidden = true;
    // the first screen: the project's growing limb bud (?example=NAME opens another, ?example= the form's own scenario)
    const wanted = new URLSearchParams(location.search).get('example') ?? FIRST_EXAMPLE;
    const path = Object.keys(EXAMPLES).find((p) => p.endsWith(`/${wanted}.yaml`));
    if (wanted && path) {
      exampleSelect.value = path;
      form.showScenario(EXAMPLES[path]);
    } else if (wanted) say(`no example named "${wanted}": the form's own scenario is set up instead`, 'warning');
    setUp();
  }
  app.ready = true;
  status();
})();

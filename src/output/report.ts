// report.html: one self-contained page per run (inline SVG and embedded PNG, no network) with the
// results, the curve, the frames to step through (a small inline script), the model and the cautions.

import { existsSync, readFileSync } from 'node:fs';
import { dirname } from 'node:path';
import sharp, { type Sharp } from 'sharp';
import type { CaseModel, Vec2 } from '../case/model.js';
import type { PolyMesh } from '../mesh/polymesh.js';
import { cellCount, vertexCount } from '../mesh/polymesh.js';
import type { AnalysisResult, StepRow } from '../fracture/analysis.js';
import { makeLaw } from '../cohesive/laws.js';
import { characteristicLength } from '../case/describe.js';
import { writeFileAtomic } from './files.js';
import { esc, inlineSvg } from './svg.js';

export { inlineSvg };
import { formatValue } from './ticks.js';
import { pickFrames, pngDataUri, svgWidth } from './png.js';

import { STEPPER_WIDTH, type FrameFile, type RunCaseFile } from './frames.js';
import { stepperHtml, type StepperFrame } from './stepper.js';
import { labSections } from './labsections.js';
export type { FrameFile };

import { curvePeaks, wedgeRatio, type WorkOfFracture } from './warnings.js';
export type { WorkOfFracture };

export interface ReportInput {
  c: CaseModel;
  result: AnalysisResult;
  /** The mesh the run started from, or its counts. */
  initialMesh: PolyMesh | { polygons: number; vertices: number };
  frames: FrameFile[];
  /** The curve picture (SVG text), or null for a run of one step. */
  curveSvg: string | null;
  /** Picture of the final state (SVG text), shown large when there are no frames. */
  finalSvg?: string | null;
  /** Picture of the initial mesh (SVG text). */
  meshSvg?: string | null;
  timings: { mesh: number; solve: number; total: number };
  workOfFracture: WorkOfFracture | null;
  /** The rupta that ran the case and the case file's hash (case.json of the run folder). */
  run?: Pick<RunCaseFile, 'rupta' | 'caseHash'>;
  /** One sentence per way the run is not physical (summary.json's warnings). */
  warnings?: string[];
  generatedAt?: Date;
  /** Thumbnails in the strip (default 6). */
  thumbnails?: number;
}

/** What reportHtml needs once the pictures are embedded. */
export interface ReportData extends Omit<ReportInput, 'frames' | 'finalSvg' | 'thumbnails' | 'meshSvg'> {
  strip: { step: number; caption: string; src: string }[];
  /** The section that steps through every frame (with two frames or more); it takes the place of the strip and the last frame. */
  stepper?: string;
  /** Sections for the comparisons and fits found in the run folder (HTML). */
  lab?: string;
  /** data: URI of the final picture. */
  finalPicture?: string;
  /** The mesh picture: SVG text to inline, or a data: URI when the SVG is too large to inline. */
  meshPicture?: string;
}


/** Above this size an SVG picture goes into the page as PNG. */
const INLINE_SVG_MAX = 400_000;

export const CAUTION = 'predictions are model results that support, never replace, physical testing and design checks under the local codes by a licensed engineer';

/** Write report.html, embedding thumbnails of the chosen frames. */
export async function writeReport(path: string, input: ReportInput): Promise<void> {
  const lab = await labSections(dirname(path), (png) => pngDataUri(sharp(png)));
  if (input.frames.length >= 2) {
    // every frame, at a width that keeps the page small; the slider shows the last one first
    const shown: StepperFrame[] = [];
    for (const f of input.frames) {
      const src = f.thumb ?? (f.png && existsSync(f.png) ? pngFileUri(readFileSync(f.png)) : null) ?? await thumbnail(f, STEPPER_WIDTH);
      if (src) shown.push({ step: f.step, src, caption: frameCaption(input.result.rows.find((r) => r.step === f.step)) });
    }
    if (shown.length >= 2) {
      let meshPicture: string | undefined;
      if (input.meshSvg) meshPicture = input.meshSvg.length <= INLINE_SVG_MAX ? input.meshSvg : await pngDataUri(svgRaster(Buffer.from(input.meshSvg), 1100));
      writeFileAtomic(path, reportHtml({ ...input, strip: [], stepper: stepperHtml(shown, input.result.rows), meshPicture, lab }));
      return;
    }
  }
  const strip: ReportData['strip'] = [];
  for (const f of chooseFrames(input.frames, input.result, input.thumbnails ?? 6)) {
    const src = await thumbnail(f, 480);
    if (src) strip.push({ step: f.step, caption: frameCaption(input.result.rows.find((r) => r.step === f.step)), src });
  }
  // the last frame shows the final crack with the whole curve; without frames, the final field picture
  let finalPicture: string | undefined;
  const last = input.frames[input.frames.length - 1];
  if (last) finalPicture = (await thumbnail(last, 1100)) ?? undefined;
  if (!finalPicture && input.finalSvg) finalPicture = await pngDataUri(svgRaster(Buffer.from(input.finalSvg), 1100));
  let meshPicture: string | undefined;
  if (input.meshSvg) {
    meshPicture = input.meshSvg.length <= INLINE_SVG_MAX ? input.meshSvg
      : await pngDataUri(svgRaster(Buffer.from(input.meshSvg), 1100));
  }
  writeFileAtomic(path, reportHtml({ ...input, strip, finalPicture, meshPicture, lab }));
}

/** Frames for the strip: evenly spaced from first to last, with the one nearest the peak. */
export function chooseFrames(frames: FrameFile[], result: AnalysisResult, count: number): FrameFile[] {
  if (frames.length === 0 || count <= 0) return [];
  // the unloaded state says little once there are enough frames to choose from
  if (frames.length > count && frames[0].step === 0) frames = frames.slice(1);
  const pick = new Set(pickFrames(frames.length, Math.max(1, count - 1)));
  let near = 0;
  const ps = result.peak.step;
  for (let i = 1; i < frames.length; i++) if (Math.abs(frames[i].step - ps) < Math.abs(frames[near].step - ps)) near = i;
  pick.add(near);
  return [...pick].sort((a, b) => a - b).map((i) => frames[i]);
}

/** An SVG document rasterised at the density that gives this width, so lines and text stay sharp. */
function svgRaster(svg: Buffer, width: number): Sharp {
  const w0 = svgWidth(svg.toString('utf8', 0, 2000));
  return sharp(svg, { density: Math.max(1, (72 * width) / w0), limitInputPixels: false }).resize({ width });
}

async function thumbnail(f: FrameFile, width: number): Promise<string | null> {
  // the SVG gives the sharpest picture at any size; the PNG when only it was written
  if (f.svg && existsSync(f.svg)) return pngDataUri(svgRaster(readFileSync(f.svg), width));
  if (f.png && existsSync(f.png)) return pngDataUri(sharp(readFileSync(f.png)).resize({ width, kernel: 'lanczos3', withoutEnlargement: true }));
  return null;
}

/** A PNG file's bytes as a data URI, or null when its text would contain "http" (then it is encoded again). */
function pngFileUri(png: Buffer): string | null {
  const uri = `data:image/png;base64,${png.toString('base64')}`;
  return uri.includes('http') ? null : uri;
}

/** Short text under a thumbnail. */
function frameCaption(r: StepRow | undefined): string {
  if (!r) return '';
  const open = r.cmod_mm !== null ? `CMOD ${fix(r.cmod_mm, 3)} mm` : `δ ${fix(r.displacement_mm, 3)} mm`;
  return `Step ${r.step}: ${load(r.load_N)}, ${open}, crack ${fix(r.crack_length_mm, 1)} mm`;
}

/** Fixed decimals with a true minus sign, and no sign on a value that rounds to zero. */
const fix = (x: number, d: number): string => {
  if (!Number.isFinite(x)) return '—';
  const t = x.toFixed(d);
  return /^-0(\.0*)?$/.test(t) ? t.slice(1) : t.replace(/^-/, '−');
};
const sig = (x: number, d = 4): string => (Number.isFinite(x) ? formatValue(x, d) : '—');
const load = (F: number): string => (Math.abs(F) >= 1000 ? `${fix(F / 1000, 2)} kN` : `${fix(F, 1)} N`);
const pt = (p: Vec2): string => `(${sig(p[0])}, ${sig(p[1])})`;

/** Direction of a crack from its start to its tip, degrees counter-clockwise from +x. */
export function crackAngle(path: [number, number][]): number | null {
  if (path.length < 2) return null;
  const a = path[0], b = path[path.length - 1];
  if (a[0] === b[0] && a[1] === b[1]) return null;
  return (Math.atan2(b[1] - a[1], b[0] - a[0]) * 180) / Math.PI;
}

/** Smallest angle (deg) between a crack's chord and a notch's line. */
function deviation(angle: number, from: Vec2, to: Vec2): number {
  const na = (Math.atan2(to[1] - from[1], to[0] - from[0]) * 180) / Math.PI;
  let d = Math.abs(angle - na) % 360;
  if (d > 180) d = 360 - d;
  return d;
}

/** Outside addresses in a page (none should be there): href, src or url() that do not point inside it. */
export function externalReferences(html: string): string[] {
  const out: string[] = [];
  const re = /(?:href|src)\s*=\s*["']([^"']*)["']|url\(\s*["']?([^"')]*)/gi;
  for (let m = re.exec(html); m; m = re.exec(html)) {
    const v = (m[1] ?? m[2] ?? '').trim();
    if (!(v.startsWith('#') || v.startsWith('data:'))) out.push(v);
  }
  return out;
}

function row(k: string, v: string, id?: string): string {
  return `<tr${id ? ` id="${id}"` : ''}><th scope="row">${k}</th><td>${v}</td></tr>\n`;
}

function table(caption: string, rows: string, id: string): string {
  const cap = caption ? `<caption>${esc(caption)}</caption>` : '';
  return `<table id="${id}">${cap}\n<tbody>\n${rows}</tbody></table>\n`;
}

function bbox(pts: Vec2[]): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const [x, y] of pts) { x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y); }
  return [x0, y0, x1, y1];
}

function modelTables(d: ReportData): string {
  const { c, result } = d, m = c.material;
  const [x0, y0, x1, y1] = bbox(c.geometry.outline);
  let geo = row('Specimen', `${sig(x1 - x0)} mm × ${sig(y1 - y0)} mm (outline of ${c.geometry.outline.length} corners), ${sig(c.thickness)} mm thick, ${c.model.replace('-', ' ')}`);
  c.geometry.notches.forEach((n, i) => {
    const len = Math.hypot(n.to[0] - n.from[0], n.to[1] - n.from[1]);
    geo += row(`Notch ${i + 1}`, `${pt(n.from)} to ${pt(n.to)} mm: ${sig(len)} mm long, ${n.width > 0 ? `${sig(n.width)} mm wide` : 'a sharp slit'}`);
  });
  if (c.geometry.holes.length) geo += row('Holes', c.geometry.holes.map((h) => h.kind === 'circle' ? `circle of radius ${sig(h.radius)} mm at ${pt(h.center)}` : `polygon of ${h.points.length} corners`).join('; '));
  geo += row('Supports', c.supports.map((s) => `${s.at ? `at ${pt(s.at)}` : `along ${pt(s.along![0])}–${pt(s.along![1])}`}, fixed in ${s.fix}${s.width > 0 ? `, ${sig(s.width)} mm bearing` : ''}`).join('; '));
  geo += row('Loads', c.loads.map((l) => `${l.at ? `at ${pt(l.at)}` : `along ${pt(l.along![0])}–${pt(l.along![1])}`}, direction ${pt(l.direction)}${l.width > 0 ? `, ${sig(l.width)} mm bearing` : ''}`).join('; '));
  const ctl = c.control;
  geo += row('Control', `${ctl.by === 'cmod' ? 'crack-mouth opening' : ctl.by} to ${sig(ctl.target)} ${ctl.by === 'force' ? 'N' : 'mm'} in ${ctl.increments} increments`
    + (ctl.gauge ? `; gauge ${pt(ctl.gauge.from)}–${pt(ctl.gauge.to)}` : '') + (c.crack && ctl.stopAtLoadFraction > 0 ? `; stop at ${sig(100 * ctl.stopAtLoadFraction)} % of the peak load` : ''));
  geo += row('Crack', c.crack ? `from ${Array.isArray(c.crack.start) ? c.crack.start.map(pt).join(', ') : c.crack.start.replace('-', ' ')}, ${c.crack.criterion.replace('-', ' ')} criterion, ${sig(c.crack.growthStep)} mm growth step, stress averaged over ${sig(c.crack.averagingRadius)} mm` : 'none (elastic analysis)');

  const lch = characteristicLength(m);
  const wc = makeLaw(m.softening, m.ft, m.GF).wc;
  let mat = row('Elastic', `E = ${sig(m.E)} MPa, ν = ${sig(m.nu)}`);
  mat += row('Tensile strength f<sub>t</sub>', `${sig(m.ft)} MPa`);
  mat += row('Fracture energy G<sub>F</sub>', `${sig(m.GF)} N/mm`);
  mat += row('Softening', `${m.softening}, critical opening w<sub>c</sub> = ${sig(wc)} mm, shear weight β = ${sig(m.shearWeight)}`);
  mat += row('Characteristic length l<sub>ch</sub> = E·G<sub>F</sub>/f<sub>t</sub>²', `${sig(lch)} mm`, 'lch');

  const im = d.initialMesh;
  const counts = 'xy' in im ? { polygons: cellCount(im), vertices: vertexCount(im) } : im;
  let mesh = row('Settings', `size ${sig(c.mesh.size)} mm, ${sig(c.mesh.tipSize)} mm within ${sig(c.mesh.refineRadius)} mm of the tips, ${c.mesh.lloyd} Lloyd iterations, seed ${c.mesh.seed}${c.mesh.coarsen ? ', coarsened behind the tip' : ''}`);
  mesh += row('Initial mesh', `${counts.polygons} polygons, ${counts.vertices} vertices`);
  mesh += row('Final mesh', `${result.mesh.polygons} polygons, ${result.mesh.vertices} vertices`);
  mesh += row('Degrees of freedom', `${result.dofs.initial} initial, ${result.dofs.final} final, ${result.dofs.max} at most`);
  return table('Specimen, supports and loading', geo, 'geometry') + table('Material', mat, 'material') + table('Mesh', mesh, 'mesh');
}

function resultsTable(d: ReportData): string {
  const { c, result } = d, pk = curvePeaks(result.rows), p = result.rows.length > 0 ? pk.peak : result.peak, last = result.rows[result.rows.length - 1];
  let t = row('Status', `${esc(result.status)}: ${esc(result.reason)}`);
  t += row('Steps', String(Math.max(0, result.rows.length - 1)));
  t += row('Peak load', `${load(p.load_N)} (step ${p.step}, the first maximum of the curve)`, 'peak-load');
  if (c.wedge) t += row('Vertical machine force at peak', `${load(wedgeRatio(c.wedge.angle) * p.load_N)} (frictionless wedge of ${c.wedge.angle}°; the peak load above is the splitting force)`, 'wedge');
  if (pk.later) t += row('Later maximum', `${load(pk.later.load_N)} (step ${pk.later.step}), after the load fell to ${load(result.rows[pk.minimum].load_N)}`, 'later-maximum');
  t += row('Load-point displacement at peak', `${sig(p.displacement_mm)} mm`);
  t += row('CMOD at peak', p.cmod_mm !== null ? `${sig(p.cmod_mm)} mm` : '— (no gauge)');
  const wf = d.workOfFracture;
  if (wf) {
    t += row('Work of fracture', `${sig(wf.W_Nmm)} N·mm over a ligament of ${sig(wf.ligamentArea_mm2)} mm² (work of the machine ${sig(wf.externalWork_Nmm)} N·mm less ${sig(wf.storedElastic_Nmm)} N·mm still stored)`);
    t += row(`G<sub>F</sub> estimate (work / ligament area${wf.lowerBound ? ', a lower bound' : ''})`, `${sig(wf.GF_Nmm, 3)} N/mm, ${sig((100 * wf.GF_Nmm) / c.material.GF, 3)} % of the input G<sub>F</sub>; ${esc(wf.note)}`, 'gf');
  }
  if (last) {
    t += row('Final crack length', `${fix(last.crack_length_mm, 1)} mm`, 'crack-length');
    if (last.tip_x_mm !== null && last.tip_y_mm !== null) t += row('Final tip', `${pt([last.tip_x_mm, last.tip_y_mm])} mm`);
  }
  const angles = result.crackPaths.map((path, i) => {
    const a = crackAngle(path);
    if (a === null) return null;
    const notch = c.geometry.notches.find((n) => Math.hypot(n.to[0] - path[0][0], n.to[1] - path[0][1]) < 1e-6 * (1 + Math.abs(n.to[0]) + Math.abs(n.to[1])) + c.mesh.tipSize);
    const dev = notch ? `, ${fix(deviation(a, notch.from, notch.to), 1)}° off the notch line` : '';
    return `${result.crackPaths.length > 1 ? `crack ${i + 1}: ` : ''}${fix(a, 1)}° from +x, start to tip${dev}`;
  }).filter((s): s is string => s !== null);
  t += row('Crack angle', angles.length ? angles.join('; ') : c.crack ? '— (no crack grew)' : '— (elastic analysis)', 'crack-angle');
  if (last) t += row('Energy at the end', `external work ${fix(last.external_work_Nmm, 1)} N·mm, dissipated ${fix(last.dissipated_Nmm, 1)} N·mm, stored ${fix(last.elastic_energy_Nmm, 1)} N·mm`);
  return table('', t, 'results');
}

const CSS = `
:root{--ink:#1b1b1b;--muted:#4a4f55;--rule:#d5d9de;--band:#f4f6f8}
*{box-sizing:border-box}
body{margin:0 auto;max-width:1100px;padding:28px 32px 48px;font:15px/1.45 "DejaVu Sans",Helvetica,Arial,sans-serif;color:var(--ink);background:#fff}
h1{font-size:24px;margin:0 0 4px}h2{font-size:18px;margin:30px 0 10px;padding-bottom:4px;border-bottom:1px solid var(--rule)}
.meta{color:var(--muted);margin:0 0 14px}
.caution{border-left:4px solid #c4452d;background:#fbf1ee;padding:10px 14px;margin:14px 0}
.status-bad{border-left-color:#d19a1f;background:#fbf6e9}
table{border-collapse:collapse;width:100%;margin:0 0 14px}
caption{text-align:left;font-weight:bold;padding:4px 0}
th,td{text-align:left;vertical-align:top;padding:5px 10px;border-bottom:1px solid var(--rule)}
th{width:34%;font-weight:normal;color:var(--muted)}
tbody tr:nth-child(odd){background:var(--band)}
table.lab th{width:auto}table.lab th[scope=col]{color:var(--ink);font-weight:bold}
figure{margin:0 0 14px}figcaption{color:var(--muted);font-size:13px;margin-top:4px}
.strip{display:grid;grid-template-columns:repeat(auto-fill,minmax(320px,1fr));gap:14px}
.strip img,.final img{width:100%;height:auto;border:1px solid var(--rule)}
.cols{display:grid;grid-template-columns:1fr 1fr;gap:0 24px}
@media (max-width:800px){.cols{grid-template-columns:1fr}}
.stepper{display:grid;grid-template-columns:minmax(0,3fr) minmax(0,2fr);gap:0 24px;align-items:start}
.stepper-frame img{width:100%;height:auto;border:1px solid var(--rule)}
.stepper input[type=range]{width:100%;margin:8px 0 14px}
.stepper label{display:block}#stepper-step{font-weight:bold}
@media (max-width:900px){.stepper{grid-template-columns:1fr}}
@media print{body{padding:0;max-width:none}h2{break-after:avoid}figure,table{break-inside:avoid}}
`;

/** The page as text. */
export function reportHtml(d: ReportData): string {
  const { c, result } = d;
  const when = d.generatedAt ?? new Date();
  const parts: string[] = [];
  parts.push('<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n<meta name="viewport" content="width=device-width, initial-scale=1">\n');
  // an empty icon keeps the browser from asking for one
  parts.push(`<link rel="icon" href="data:,">\n<title>${esc(c.title)}: rupta report</title>\n<style>${CSS}</style>\n</head>\n<body>\n`);
  const by = d.run ? `rupta ${esc(d.run.rupta)}` : 'rupta';
  parts.push(`<h1>${esc(c.title)}</h1>\n<p class="meta">Cohesive crack analysis by ${by}, case “${esc(c.name)}”, written ${esc(when.toISOString().slice(0, 16).replace('T', ' '))} UTC.</p>\n`);
  parts.push(`<p class="caution" id="caution"><strong>Caution.</strong> These ${esc(CAUTION)}.</p>\n`);
  if (result.status !== 'complete') parts.push(`<p class="caution status-bad" id="status-note"><strong>The run did not complete (${esc(result.status)}):</strong> ${esc(result.reason)}. The results below cover the steps that converged.</p>\n`);
  if (d.warnings && d.warnings.length > 0) {
    parts.push('<div class="caution status-bad" id="warnings"><strong>Warnings: parts of this result are not physical.</strong>\n<ul>\n');
    for (const w of d.warnings) parts.push(`<li>${esc(w)}</li>\n`);
    parts.push('</ul></div>\n');
  }

  parts.push('<h2>Results</h2>\n');
  parts.push(resultsTable(d));
  if (d.curveSvg) {
    const gauge = result.rows.some((r) => r.cmod_mm !== null);
    parts.push(`<figure id="curve">${inlineSvg(d.curveSvg, 'curve-', 'Load against opening')}\n<figcaption>Load against load-point displacement${gauge ? ' (left) and against crack-mouth opening (right)' : ''}; the circle marks the peak.</figcaption></figure>\n`);
  }
  if (d.finalPicture) {
    const what = c.crack ? ', cracks with their cohesive zones shaded by damage' : '';
    const inset = d.strip.length ? '; the inset marks the step on the curve' : '';
    parts.push(`<figure class="final" id="final"><img src="${d.finalPicture}" alt="The last step"><figcaption>Last step: major principal stress over the tensile strength${what}, deformed shape magnified as stated${inset}.</figcaption></figure>\n`);
  }
  if (d.stepper) parts.push('<h2>Frames</h2>\n', d.stepper);
  if (d.strip.length) {
    parts.push('<h2>Frames</h2>\n<div class="strip" id="frames">\n');
    for (const f of d.strip) parts.push(`<figure><img src="${f.src}" alt="Frame of step ${f.step}"><figcaption>${esc(f.caption)}</figcaption></figure>\n`);
    parts.push('</div>\n');
  }

  if (d.lab) parts.push(d.lab);
  parts.push('<h2>Model</h2>\n');
  parts.push(modelTables(d));
  if (d.meshPicture) {
    const pic = d.meshPicture.startsWith('data:') ? `<img src="${d.meshPicture}" alt="Initial mesh">` : inlineSvg(d.meshPicture, 'mesh-', 'Initial mesh');
    const grows = c.crack ? `; the run refines it ahead of each growing tip${c.mesh.coarsen ? ' and coarsens it behind' : ''}` : '';
    parts.push(`<figure id="mesh-picture">${pic}<figcaption>Initial mesh with supports and loads${grows}.</figcaption></figure>\n`);
  }
  parts.push('<h2>Run</h2>\n');

  let tm = row('Meshing', `${fix(d.timings.mesh, 2)} s`);
  tm += row('Solving', `${fix(d.timings.solve, 2)} s`);
  tm += row('Whole run', `${fix(d.timings.total, 2)} s`, 'run-time');
  if (d.run) {
    tm += row('Program', `rupta ${esc(d.run.rupta)}`, 'version');
    const h = d.run.caseHash;
    tm += row(h.of === 'case file' ? `SHA-256 of the case file${h.file ? ` ${esc(h.file)}` : ''}` : 'SHA-256 of the validated case', `<code>${esc(h.sha256)}</code>`, 'case-hash');
  }
  parts.push(table('', tm, 'timings'));

  parts.push('<h2>Cautions</h2>\n<ul id="cautions">\n');
  const notes = [
    `These ${CAUTION}.`,
    `The model is two-dimensional (${c.model.replace('-', ' ')}, ${sig(c.thickness)} mm thick): the bulk stays linear elastic and all cracking is lumped into cohesive cracks with a ${c.material.softening} softening law.`,
    'The crack path follows a principal-stress criterion in steps of the growth length; curves and paths depend somewhat on the mesh and on that step, so check them by refining both.',
    'Material values are inputs, not results: the curve is only as good as the E, ft and GF measured for this mix.',
    d.workOfFracture ? `The GF estimate counts only the work up to the last step; ${d.workOfFracture.note}.` : '',
  ].filter(Boolean);
  for (const n of notes) parts.push(`<li>${esc(n)}</li>\n`);
  parts.push('</ul>\n</body>\n</html>\n');
  return parts.join('');
}

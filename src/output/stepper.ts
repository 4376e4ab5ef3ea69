// The part of report.html that steps through a run: every frame embedded, a slider and the arrow
// keys to move between them, and a marker that moves along the load–opening curve. A small inline
// script, no outside address: the page works offline as one file.

import type { StepRow } from '../fracture/analysis.js';
import { el, esc, n1, text } from './svg.js';
import { formatTicks, niceAxis } from './ticks.js';

export interface StepperFrame { step: number; src: string; caption: string }

const W = 640, H = 300, L = 70, R = 20, T = 16, B = 52;

/** The load–opening curve of the whole run with a marker, and the marker's place for each frame. */
function stepperCurve(rows: StepRow[], steps: number[]): { svg: string; marks: [number, number][] } {
  const gauge = rows.some((r) => r.cmod_mm !== null);
  const xs = rows.map((r) => (gauge ? r.cmod_mm ?? NaN : r.displacement_mm)), ys = rows.map((r) => r.load_N);
  const fin = (v: number[]) => v.filter(Number.isFinite);
  const ax = niceAxis(Math.min(0, ...fin(xs)), Math.max(0, ...fin(xs)), 6), ay = niceAxis(Math.min(0, ...fin(ys)), Math.max(0, ...fin(ys)), 6);
  const X = (x: number) => L + ((x - ax.lo) / (ax.hi - ax.lo)) * (W - L - R);
  const Y = (y: number) => H - B - ((y - ay.lo) / (ay.hi - ay.lo)) * (H - B - T);
  const g: string[] = [];
  let grid = '';
  for (const t of ax.ticks) grid += `M${n1(X(t))} ${T}V${H - B}`;
  for (const t of ay.ticks) grid += `M${L} ${n1(Y(t))}H${W - R}`;
  g.push(el('path', { d: grid, stroke: '#e3e6ea', 'stroke-width': 1, fill: 'none' }));
  g.push(el('rect', { x: L, y: T, width: W - L - R, height: H - B - T, fill: 'none', stroke: '#1b1b1b', 'stroke-width': 1 }));
  formatTicks(ax.ticks).forEach((s, i) => g.push(text(X(ax.ticks[i]), H - B + 18, s, { 'font-size': 13, 'text-anchor': 'middle', fill: '#1b1b1b' })));
  formatTicks(ay.ticks).forEach((s, i) => g.push(text(L - 6, Y(ay.ticks[i]) + 4, s, { 'font-size': 13, 'text-anchor': 'end', fill: '#1b1b1b' })));
  g.push(text((L + W - R) / 2, H - 10, gauge ? 'CMOD (mm)' : 'Load-point displacement (mm)', { 'font-size': 14, 'text-anchor': 'middle', fill: '#1b1b1b' }));
  g.push(text(0, 0, 'Load (N)', { 'font-size': 14, 'text-anchor': 'middle', fill: '#1b1b1b', transform: `translate(16 ${(T + H - B) / 2}) rotate(-90)` }));
  let d = '', pen = false;
  for (let i = 0; i < rows.length; i++) {
    if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i])) { pen = false; continue; }
    d += (pen ? 'L' : 'M') + n1(X(xs[i])) + ' ' + n1(Y(ys[i]));
    pen = true;
  }
  g.push(el('path', { d, fill: 'none', stroke: '#1d4e89', 'stroke-width': 2, 'stroke-linejoin': 'round' }));
  const marks = steps.map((s): [number, number] => {
    let k = rows.length - 1;
    while (k > 0 && rows[k].step > s) k--;
    return Number.isFinite(xs[k]) && Number.isFinite(ys[k]) ? [Number(n1(X(xs[k]))), Number(n1(Y(ys[k])))] : [L, H - B];
  });
  const [mx, my] = marks[marks.length - 1] ?? [L, H - B];
  g.push(el('circle', { id: 'stepper-marker', cx: mx, cy: my, r: 6, fill: '#c4452d', stroke: '#ffffff', 'stroke-width': 1.5 }));
  const svg = `<svg viewBox="0 0 ${W} ${H}" role="img" aria-label="Load against opening, with the step shown" style="width:100%;height:auto">${g.join('')}</svg>`;
  return { svg, marks };
}

// steps with the slider (input) or, anywhere else on the page, with the arrow keys, Home and End
const SCRIPT = `(function(){
var data=JSON.parse(document.getElementById('stepper-data').textContent);
var s=document.getElementById('stepper-slider'),img=document.getElementById('stepper-frame'),out=document.getElementById('stepper-step'),cap=document.getElementById('stepper-caption'),mk=document.getElementById('stepper-marker');
function show(i){i=Math.max(0,Math.min(data.length-1,i));var f=data[i];s.value=String(i);img.src=f.src;img.alt='Frame of step '+f.step;out.textContent='Step '+f.step+' ('+(i+1)+' of '+data.length+')';cap.textContent=f.caption;mk.setAttribute('cx',f.mx);mk.setAttribute('cy',f.my);}
s.addEventListener('input',function(){show(Number(s.value));});
document.addEventListener('keydown',function(e){if(e.target===s||e.altKey||e.ctrlKey||e.metaKey)return;var i=Number(s.value);
if(e.key==='ArrowRight'||e.key==='ArrowUp')i++;else if(e.key==='ArrowLeft'||e.key==='ArrowDown')i--;else if(e.key==='Home')i=0;else if(e.key==='End')i=data.length-1;else return;
e.preventDefault();show(i);});
show(data.length-1);
})();`;

/** The stepping section: frames in order, the last shown first. */
export function stepperHtml(frames: StepperFrame[], rows: StepRow[]): string {
  const { svg, marks } = stepperCurve(rows, frames.map((f) => f.step));
  const data = frames.map((f, i) => ({ step: f.step, src: f.src, caption: f.caption, mx: marks[i][0], my: marks[i][1] }));
  const last = frames[frames.length - 1];
  // "<" never appears raw inside the script element
  const json = JSON.stringify(data).replace(/</g, '\\u003c');
  return `<div class="stepper" id="stepper">
<figure class="stepper-frame"><img id="stepper-frame" src="${last.src}" alt="Frame of step ${last.step}"><figcaption id="stepper-caption">${esc(last.caption)}</figcaption></figure>
<div class="stepper-side">
<label for="stepper-slider">Step through the run (slider, or the arrow keys): <output id="stepper-step" for="stepper-slider">Step ${last.step} (${frames.length} of ${frames.length})</output></label>
<input type="range" id="stepper-slider" min="0" max="${frames.length - 1}" step="1" value="${frames.length - 1}">
<figure id="stepper-curve">${svg}<figcaption>The marker shows the step on the load–opening curve.</figcaption></figure>
</div>
</div>
<script type="application/json" id="stepper-data">${json}</script>
<script>${SCRIPT}</script>
`;
}

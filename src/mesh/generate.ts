// Graded centroidal Voronoi polygon mesh of a domain, conforming and reproducible from mesh.seed.

import type { MeshSettings } from '../case/model.js';
import type { Domain } from '../geometry/domain.js';
import { domainExtent, domainGrid } from '../geometry/domain.js';
import { CellClipper, LoopSink } from './clip.js';
import { collapseTinyEdges, dropNeedlessBoundaryVertices, insertHangingNodes, mergeSlivers, pack, pinPoints, weld } from './polish.js';
import type { PolyMesh } from './polymesh.js';
import { lloydStep, placeSeeds } from './seeds.js';
import { makeSizeField, sizeFieldMin } from './sizefield.js';
import { clipToBox, VoronoiCells } from './voronoi.js';

export function generateMesh(d: Domain, s: MeshSettings): PolyMesh {
  const h = makeSizeField(s, d.tips, d.points, d.strips);
  const hmin = sizeFieldMin(s, d.tips, d.points, d.strips);
  const ss = placeSeeds(d, s, h, hmin);
  for (let it = 0; it < s.lloyd; it++) lloydStep(d, ss, h);

  const vor = new VoronoiCells(ss.pts);
  const { inedges, halfedges, triangles } = vor.delaunay;
  // an interior named point is the circumcentre of its three seeds: store it exactly
  for (const pin of ss.pins) {
    const [a, b, c] = pin.seeds, e0 = inedges[a];
    let e = e0, guard = 0;
    do {
      const t = (e / 3) | 0, v0 = triangles[3 * t], v1 = triangles[3 * t + 1], v2 = triangles[3 * t + 2];
      if ((v0 === b || v1 === b || v2 === b) && (v0 === c || v1 === c || v2 === c)) {
        vor.cc[2 * t] = pin.p[0]; vor.cc[2 * t + 1] = pin.p[1];
        break;
      }
      e = e % 3 === 2 ? e - 2 : e + 1;
      e = halfedges[e];
    } while (e !== e0 && e !== -1 && guard++ < 1000);
  }

  const clipper = new CellClipper(domainGrid(d));
  const sink = new LoopSink();
  const xs: number[] = [], ys: number[] = [], ids: number[] = [];
  const [x0, y0, x1, y1] = ss.box;
  const fresh = () => clipper.freshId();
  const grid = domainGrid(d), cx = vor.xs, cy = vor.ys;
  for (let i = 0; i < ss.count; i++) {
    const m = vor.cell(i);
    if (!m) continue;
    let xmin = Infinity, ymin = Infinity, xmax = -Infinity, ymax = -Infinity;
    for (let k = 0; k < m; k++) {
      if (cx[k] < xmin) xmin = cx[k]; if (cx[k] > xmax) xmax = cx[k];
      if (cy[k] < ymin) ymin = cy[k]; if (cy[k] > ymax) ymax = cy[k];
    }
    if (grid.boxIsEmpty(xmin, ymin, xmax, ymax)) {
      // interior cell (its seed is inside the domain): kept whole
      for (let k = 0; k < m; k++) { sink.xy.push(cx[k], cy[k]); sink.ring.push(0); }
      sink.ends.push(sink.xy.length >> 1);
      continue;
    }
    vor.cellArrays(m, xs, ys, ids);
    clipToBox(xs, ys, ids, x0, y0, x1, y1, fresh);
    clipper.clip(xs, ys, ids, sink);
  }

  const ext = domainExtent(d), tol = 1e-9 * ext;
  const w = weld(sink.xy, sink.ring, sink.ends, tol);
  pinPoints(w, d.points, tol, (x, y) => 0.5 * h(x, y));
  // cells split around an enclosed hole leave points on their neighbours' sides
  insertHangingNodes(w, d, tol);
  mergeSlivers(w, h);
  collapseTinyEdges(w, h);
  dropNeedlessBoundaryVertices(w, h);
  insertHangingNodes(w, d, tol);
  return pack(w);
}

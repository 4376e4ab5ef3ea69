// rupta as a library: everything the command line does, for scripted parameter studies.
//
//   import { loadCase, runCase } from 'rupta';
//   const c = loadCase('cases/beam-3pb-demo.yaml');
//   for (const GF of [0.08, 0.11, 0.14]) {
//     const { result } = await runCase({ ...c, material: { ...c.material, GF } }, { out: `out/gf-${GF}`, force: true });
//     console.log(GF, result.peak.load_N);
//   }

export type * from './case/model.js';
export { loadCase, parseCase, checkCase, describeCase, characteristicLength } from './case/index.js';
export { InputError, RunStopped, SingularMatrixError } from './errors.js';
export { buildDomain, type Domain } from './geometry/domain.js';
export { generateMesh } from './mesh/generate.js';
export { meshStats } from './mesh/stats.js';
export type { PolyMesh } from './mesh/polymesh.js';
export { elasticMatrix, principal } from './vem/material.js';
export { elementStiffness, ElementWork } from './vem/element.js';
export { cellStresses, vertexStresses, recoveredVertexStresses } from './vem/stress.js';
export * from './linalg/index.js';
export { makeLaw, type SofteningLaw } from './cohesive/laws.js';
export { cohesivePoint, interfaceEnergy, penaltyFor, type CohesiveParams } from './cohesive/interface.js';
export { barCurve } from './cohesive/bar.js';
export { Analysis, type AnalysisResult, type StepRow, type ProbeRow, type Snapshot, type StepEvent } from './fracture/analysis.js';
export { runCase, meshCase, type RunOptions, type RunOutcome } from './run.js';
export { templates, listTemplates, renderTemplate } from './templates/index.js';
export { readLabCurve, parseLabCurve, xKindOf, type LabCurve, type LabColumns } from './lab/import.js';
export { workOfFracture, rilemGF } from './lab/work.js';
export { compareCurves, readRunCurve, compareTable, compareJson, meanBand, stat } from './lab/compare.js';
export { fitCase, fitJson } from './lab/fit.js';
export { correctCurve, estimateCompliance, toeCorrection, addPreload, removeCompliance } from './lab/correct.js';
export { labReportHtml, compareSectionHtml, fitSectionHtml } from './lab/report.js';
export * as output from './output/index.js';
export { runStudy, type StudyOptions, type StudyResult, type StudyEvent } from './study/study.js';
export { loadStudy, studyFromData, type StudySpec } from './study/spec.js';
export { expandStudy, type Variant } from './study/expand.js';
export { fitSizeEffect, sizeEffectLaw, type SizeEffectFit } from './study/sizeeffect.js';
export type { StudyRow } from './study/collect.js';

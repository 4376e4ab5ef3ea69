// The case room: read, validate, fill defaults and describe a case.
export type * from './model.js';
export { parseCase, loadCase, caseFromData, caseName } from './load.js';
export { checkCase, MAX_POLYGONS } from './check.js';
export { describeCase, characteristicLength } from './describe.js';
export { DEFAULTS, DERIVED_DEFAULTS, fillDefaults } from './defaults.js';
export { FIELDS, mustBe } from './fields.js';
export { caseSchema, type CaseInput } from './schema.js';
export { unitSlipWarnings, settingWarnings, caseWarnings } from './plausible.js';

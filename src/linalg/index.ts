// Sparse symmetric linear algebra: CSR assembly, ordering, supernodal LDLᵀ, Matrix Market files.

export {
  type CsrPattern,
  type CsrMatrix,
  type SubMatrix,
  patternFromBlocks,
  assemblyMap,
  blockMapOffsets,
  findEntry,
  matrixOnPattern,
  zeroValues,
  matVec,
  submatrix,
  submatrixInto,
  csrFromTriplets,
  toDense,
} from './csr.js';
export { type OrderingMethod, fillReducingOrder, DISSECTION_FROM_ROWS } from './ordering.js';
export { type Symbolic, type AnalyzeOptions, analyze } from './symbolic.js';
export { type Factor, factorize, factorizeTrailing, trailingSchur } from './ldlt.js';
export { readMatrixMarket, writeMatrixMarket } from './mtx.js';

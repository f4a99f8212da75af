export type { CompiledSystem, NetworkStructure } from './compiled-system';
export { ModelError, formatIssue, formatPath, type ModelIssue } from './errors';
export { MODEL_LIMITS } from './limits';
export { DOCUMENT_FUNCTIONS } from './expr';
export { NAME_PATTERN, RESERVED_NAMES } from './names';
export {
  modelDocumentSchema,
  DEFAULT_COUPLING_TERM,
  type ModelDocument,
  type ModelDocumentInput,
  type NetworkDocument,
  type OdeDocument,
} from './schema';
export { validateModelDocument, type ValidationResult } from './validate';
export { checkExpression, type CheckResult } from './check-expression';
export { compileModel, compileModelJson, type CompileOptions } from './compile';
export { canonicalJson } from './canonical-json';
export { documentHash } from './document-hash';

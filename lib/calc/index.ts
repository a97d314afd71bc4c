export { CalcError } from './errors';
export type { CalcErrorCode } from './errors';

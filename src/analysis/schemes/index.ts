export {
  advectLine,
  runAdvection1d,
  schemeChoice,
  SCHEME_NAMES,
  type Advection1dOptions,
  type SchemeName,
} from './advection-1d';
export { runAdvection2dSplit, type Advection2dOptions } from './advection-2d';
export { LIMITER_NAMES, limiterFunction, psi, type LimiterName } from './limiters';
export { sineWave, topHat } from './profiles';

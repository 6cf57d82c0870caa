/**
 * The policy a run is judged by: thresholds and switches per rule, with per-variable overrides.
 * Stored as JSON (the web app edits it); `policySchema` validates it and fills in the defaults.
 *
 * Defaults and why:
 * - tvGrowth: a TVD scheme never increases total variation (Harten 1983), so any increase is
 *   suspect. 1D: fail when one step raises TV by more than 1e-9 of the first step's TV, warn above
 *   1e-10; the noise floor (noise-floor.ts) is always added, so round-off never trips it.
 *   2D/3D: Goodman & LeVeque (1985) prove that a TVD scheme in 2D is at most first-order accurate,
 *   so good second-order schemes (dimensionally split limited schemes) do raise 2D TV a little on
 *   smooth data: about 1e-3 of TV per step at 64x64 for split superbee, more on coarser grids
 *   (measured in tests/reference). Default 2D/3D band: warn above 1e-9, fail above 1e-2 per step,
 *   while new extrema and bound violations keep failing. System variables (one component of a
 *   nonlinear system, e.g. Euler density, where no TVD theory holds per component): warn above
 *   1e-5, fail above 1e-2. `smoothProfile`: for smooth profiles the discrete TV of the exact
 *   solution itself changes as cell centres sample it at shifting points (about 5e-4 of TV per
 *   step for a 100-cell sine at Courant 0.5); then TV growth up to the sampling allowance of the
 *   previous step is not a finding, and new extrema and bounds carry the judgement.
 * - newExtrema: fail when any appear (allow 0).
 * - bounds: fail when a value leaves the bounds by more than the tolerance (absolute, or relative
 *   to the first step's range; default 0, the noise floor always added). Bounds are the physical
 *   bounds when declared (here or in the upload's manifest), else the first step's range.
 * - conservation: warn above 1e-8 relative drift, fail above 1e-6 (a chosen default: well above
 *   float64 round-off over many steps, below the drift of a non-conservative discretisation);
 *   off for variables marked non-conservative.
 * - baseline: fail when a metric is worse than the accepted baseline's by more than 10 %.
 * - nonFinite: always fail; not configurable.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws";
 * Goodman & LeVeque 1985, "On the accuracy of stable schemes for 2D scalar conservation laws".
 */
import { z } from 'zod';

/** What a rule may do: 'fail' (default), 'warn' (findings are warnings at most), 'off'. */
export const checkLevelSchema = z.enum(['fail', 'warn', 'off']);
export type CheckLevel = z.infer<typeof checkLevelSchema>;

const relative = z.number().min(0).finite();

function warnBelowFail(value: { warnRelative?: number; failRelative?: number }): boolean {
  return (
    value.warnRelative === undefined || value.failRelative === undefined || value.warnRelative <= value.failRelative
  );
}
const warnBelowFailMessage = { message: 'warnRelative must not exceed failRelative' };

const tvBandSchema = (fail: number, warn: number) =>
  z
    .object({ failRelative: relative.default(fail), warnRelative: relative.default(warn) })
    .refine(warnBelowFail, warnBelowFailMessage);

export const tvGrowthSchema = z
  .object({
    check: checkLevelSchema.default('fail'),
    /** 1D: fail above this TV increase per step, relative to the first step's TV. */
    failRelative: relative.default(1e-9),
    warnRelative: relative.default(1e-10),
    /** 2D and 3D variables. */
    multiDimensional: tvBandSchema(1e-2, 1e-9).prefault({}),
    /** Variables flagged as components of a nonlinear system. */
    system: tvBandSchema(1e-2, 1e-5).prefault({}),
    /** Judge smooth profiles: TV growth within the sampling allowance is not a finding. */
    smoothProfile: z.boolean().default(false),
  })
  .refine(warnBelowFail, warnBelowFailMessage);

export const newExtremaSchema = z.object({
  check: checkLevelSchema.default('fail'),
  /** New extrema allowed per step before the rule is broken. */
  allow: z.number().int().min(0).default(0),
});

const boundsToleranceShape = {
  check: checkLevelSchema.default('fail'),
  /** Absolute distance outside the bounds that is tolerated. */
  tolerance: z.number().min(0).finite().default(0),
  /** Tolerated distance relative to the first step's range (max - min). */
  relativeTolerance: relative.default(0),
};
export const boundsSchema = z.object(boundsToleranceShape);

export const conservationSchema = z
  .object({
    check: checkLevelSchema.default('fail'),
    warnRelative: relative.default(1e-8),
    failRelative: relative.default(1e-6),
  })
  .refine(warnBelowFail, warnBelowFailMessage);

export const baselineSchema = z.object({
  check: checkLevelSchema.default('fail'),
  /** A metric is a regression when it exceeds the baseline's by more than this fraction. */
  margin: relative.default(0.1),
});

/** Per-variable overrides; anything left out falls back to the policy-wide value. */
export const variableOverrideSchema = z
  .object({
    /** Component of a nonlinear system: the looser system TV band applies. */
    system: z.boolean().optional(),
    /** False turns the conservation rule off for this variable. */
    conservative: z.boolean().optional(),
    tvGrowth: z
      .object({
        check: checkLevelSchema.optional(),
        failRelative: relative.optional(),
        warnRelative: relative.optional(),
        smoothProfile: z.boolean().optional(),
      })
      .optional(),
    newExtrema: z.object({ check: checkLevelSchema.optional(), allow: z.number().int().min(0).optional() }).optional(),
    bounds: z
      .object({
        check: checkLevelSchema.optional(),
        /** Physical bounds, e.g. 0 and 1 for a mass fraction. */
        lower: z.number().finite().optional(),
        upper: z.number().finite().optional(),
        tolerance: z.number().min(0).finite().optional(),
        relativeTolerance: relative.optional(),
      })
      .refine((b) => b.lower === undefined || b.upper === undefined || b.lower <= b.upper, {
        message: 'lower bound must not exceed upper bound',
      })
      .optional(),
    conservation: z
      .object({
        check: checkLevelSchema.optional(),
        warnRelative: relative.optional(),
        failRelative: relative.optional(),
      })
      .optional(),
  })
  .strict();

export const policySchema = z
  .object({
    version: z.literal(1).default(1),
    tvGrowth: tvGrowthSchema.prefault({}),
    newExtrema: newExtremaSchema.prefault({}),
    bounds: boundsSchema.prefault({}),
    conservation: conservationSchema.prefault({}),
    baseline: baselineSchema.prefault({}),
    /** Non-finite values always fail; the field exists so stored policies say so. */
    nonFinite: z.object({ check: z.literal('fail').default('fail') }).prefault({}),
    variables: z.record(z.string(), variableOverrideSchema).default({}),
  })
  .strict();

export type Policy = z.output<typeof policySchema>;
export type PolicyInput = z.input<typeof policySchema>;
export type VariableOverride = z.output<typeof variableOverrideSchema>;

/** The policy with every default filled in. */
export const DEFAULT_POLICY: Policy = policySchema.parse({});

/**
 * Validates a stored or submitted policy and fills in the defaults listed at the top of this
 * file; throws a ZodError when invalid.
 *
 * References: Harten 1983, "High resolution schemes for hyperbolic conservation laws"; Goodman
 * & LeVeque 1985, "On the accuracy of stable schemes for 2D scalar conservation laws".
 */
export function parsePolicy(input: unknown): Policy {
  return policySchema.parse(input ?? {});
}

/** What `judge` needs to know about a variable to pick its rules. */
export interface VariableTraits {
  variable: string;
  dims: number;
  options: {
    system?: boolean;
    conservative?: boolean;
    bounds?: { lower?: number; upper?: number };
  };
}

/** The rules for one variable after overrides, class (1D, 2D/3D, system) and manifest options. */
export interface VariableRules {
  tvGrowth: {
    check: CheckLevel;
    failRelative: number;
    warnRelative: number;
    smoothProfile: boolean;
    band: 'one-dimensional' | 'multi-dimensional' | 'system';
  };
  newExtrema: { check: CheckLevel; allow: number };
  bounds: {
    check: CheckLevel;
    lower?: number;
    upper?: number;
    tolerance: number;
    relativeTolerance: number;
  };
  conservation: { check: CheckLevel; warnRelative: number; failRelative: number };
  baseline: { check: CheckLevel; margin: number };
}

/**
 * The effective rules of one variable. Precedence: the policy's per-variable override, then the
 * upload's manifest options (system, conservative, physical bounds), then the policy-wide values.
 * The TV band is the system band for system variables, the multi-dimensional band for 2D/3D,
 * else the 1D thresholds; override thresholds replace the band's.
 *
 * References: Goodman & LeVeque 1985, "On the accuracy of stable schemes for 2D scalar
 * conservation laws" (why 2D has its own band).
 */
export function resolveRules(policy: Policy, traits: VariableTraits): VariableRules {
  const o = policy.variables[traits.variable] ?? {};
  const system = o.system ?? traits.options.system ?? false;
  const conservative = o.conservative ?? traits.options.conservative ?? true;
  const tv = policy.tvGrowth;
  const band = system ? 'system' : traits.dims >= 2 ? 'multi-dimensional' : 'one-dimensional';
  const bandValues = band === 'system' ? tv.system : band === 'multi-dimensional' ? tv.multiDimensional : tv;
  const failRelative = o.tvGrowth?.failRelative ?? bandValues.failRelative;
  const warnRelative = Math.min(o.tvGrowth?.warnRelative ?? bandValues.warnRelative, failRelative);
  const conservation = policy.conservation;
  const consFail = o.conservation?.failRelative ?? conservation.failRelative;
  return {
    tvGrowth: {
      check: o.tvGrowth?.check ?? tv.check,
      failRelative,
      warnRelative,
      smoothProfile: o.tvGrowth?.smoothProfile ?? tv.smoothProfile,
      band,
    },
    newExtrema: {
      check: o.newExtrema?.check ?? policy.newExtrema.check,
      allow: o.newExtrema?.allow ?? policy.newExtrema.allow,
    },
    bounds: {
      check: o.bounds?.check ?? policy.bounds.check,
      lower: o.bounds?.lower ?? traits.options.bounds?.lower,
      upper: o.bounds?.upper ?? traits.options.bounds?.upper,
      tolerance: o.bounds?.tolerance ?? policy.bounds.tolerance,
      relativeTolerance: o.bounds?.relativeTolerance ?? policy.bounds.relativeTolerance,
    },
    conservation: {
      check: conservative ? (o.conservation?.check ?? conservation.check) : 'off',
      failRelative: consFail,
      warnRelative: Math.min(o.conservation?.warnRelative ?? conservation.warnRelative, consFail),
    },
    baseline: { check: policy.baseline.check, margin: policy.baseline.margin },
  };
}

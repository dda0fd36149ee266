/** `fit:` section. Owned by the fit room (src/fit). */
import { z } from 'zod';

export const fitQuantity = z
  .object({
    species: z.string().min(1),
    /** `abundance`: X = N/N_H; `ratio`: N/N(reference). */
    as: z.enum(['abundance', 'ratio']).default('ratio'),
    /** The ratio's denominator, any species the observations hold (gas or ice); default observations.reference. */
    reference: z.string().min(1).optional(),
    /** This quantity's own model-uncertainty floor, dex, in place of fit.model_sigma_dex (a species whose chemistry is less certain). */
    model_sigma_dex: z.number().min(0).optional(),
  })
  .strict()
  .refine((q) => q.reference === undefined || q.as === 'ratio', {
    path: ['reference'],
    message: "a reference applies to 'as: ratio' only; remove it, or fit the ratio (as: ratio)",
  });
export type FitQuantity = z.infer<typeof fitQuantity>;

/** Parameter names a fit can profile or share: any grid condition, or `age_yr` (the output time). */
const parameterName = z.string().min(1);

export const jointGroup = z
  .object({
    name: z.string().min(1),
    /** Sightline ids of the group, or `all`. */
    sightlines: z.union([z.literal('all'), z.array(z.string().min(1)).min(2)]),
    /** Parameters the members share (one value for the whole group): `age_yr`, `density`, ... */
    share: z.union([parameterName, z.array(parameterName).min(1)]).transform((s) => (typeof s === 'string' ? [s] : s)),
  })
  .strict();
export type JointGroup = z.infer<typeof jointGroup>;

export const fitSection = z
  .object({
    quantities: z.array(fitQuantity).min(1),
    /** Model-uncertainty floor added in quadrature to every quantity's error, dex (common practice: rate-coefficient uncertainties of a factor of a few; 0.3 dex is a factor of 2). */
    model_sigma_dex: z.number().min(0).default(0.3),
    /**
     * The part of model_sigma_dex shared by every sightline of a joint group, dex: the same
     * network and rates make one error for all of them, not one each (docs/statistics.md
     * section 6). Default: half the variance, model_sigma_dex / sqrt(2) (not measured; a
     * Monte Carlo over rate coefficients would measure it).
     */
    model_sigma_shared_dex: z.number().min(0).optional(),
    /** Score detections that share a measurement (ratios to one reference, the reference beside them) with their covariance. */
    correlated_errors: z.boolean().default(true),
    /**
     * The model's own uncertainty of each quantity (docs/uncertainty.md): `floor`, the fixed
     * model_sigma_dex; `spread`, the spread of log X over the Monte Carlo realizations of the
     * rate coefficients at the sightline's best fit (section realizations), instead of the floor;
     * `spread-and-floor`, both in quadrature.
     */
    model_uncertainty: z.enum(['floor', 'spread', 'spread-and-floor']).default('floor'),
    /** Width of a limit in dex, added in quadrature to the model floor in the censored likelihood (0: the floor alone). */
    limit_sigma_dex: z.number().min(0).default(0),
    /** Confidence levels of the Delta chi^2 regions (68.3% and 95.4%: the 1 and 2 sigma of a Gaussian, common practice); the same as DEFAULT_LEVELS of the fit room's table, src/fit/regions.ts. */
    levels: z.array(z.number().gt(0).lt(1)).min(1).default([0.683, 0.954]),
    /**
     * Parameters of interest p of the Delta chi^2 thresholds of the intervals (Avni 1976):
     * 1 (the default) gives each parameter's own interval (Delta chi^2 = 1.00 at 68.3%);
     * 2 or more the projection of the joint region of p parameters onto each axis, a wider
     * interval labelled "projected" wherever it is shown. The 2-D regions always use p = 2.
     */
    parameters_of_interest: z.number().int().min(1).max(10).default(1),
    /** Pairs of parameters whose 2-D profiles are computed. */
    pairs: z.array(z.tuple([parameterName, parameterName])).default([['density', 'age_yr']]),
    /** A model agrees with a quantity when within this factor (common practice: 10, |d| < 1 dex). */
    agreement_factor: z.number().gt(1).default(10),
    /** Runner-up candidates listed per sightline (those within the smallest level's region). */
    runner_ups: z.number().int().min(0).default(10),
    /**
     * Count limits in the degrees of freedom. Off by default: a satisfied
     * limit adds almost nothing to chi^2, so counting it would make a fit
     * look better than its detections support.
     */
    limits_in_dof: z.boolean().default(false),
    /** A fit with a p-value below this is reported as poor. */
    poor_fit_p: z.number().gt(0).lt(1).default(0.01),
    /**
     * Sub-grid resolution: every grid interval of density, age and the other
     * fitted conditions is cut into this many steps, the models interpolated
     * between grid values (log abundance multilinear in log parameter and log
     * time; docs/statistics.md section 5); 1 switches it off. A map is refined
     * only while pixels x refined candidates stays within 2e9; a larger one
     * reads its profiles between grid values alone.
     */
    refine: z.number().int().min(1).max(10).default(4),
    /**
     * Readings of the candidate table: the profile (chi^2 minimised over the other
     * parameters) always; with `profile+posterior` also the posterior with priors
     * uniform in log10 of each fitted parameter (docs/statistics.md section 8).
     */
    method: z.enum(['profile', 'profile+posterior']).default('profile+posterior'),
    /** Groups of sightlines fitted jointly with shared parameters. */
    joint: z.array(jointGroup).default([]),
  })
  .strict();
export type FitSection = z.infer<typeof fitSection>;

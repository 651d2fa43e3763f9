/* hl-uncertainty.h: Monte Carlo ranges of abductor force and joint load.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each sample perturbs a copy of the prepared model and solves native and
 * every option with that same perturbation (so the comparison against
 * native is paired):
 *
 *  1. landmark placement: each coordinate of each placed mechanics
 *     landmark (hip centre, midline point, abductor origin when placed,
 *     abductor insertion) moves by a normal error of SD landmark_sd_mm; an
 *     error of the hip centre moves every other point the opposite way in
 *     the hip-centred solver frame; where the line is set by angle its
 *     virtual origin moves with the insertion;
 *  2. abductor line angle: the line turns about the insertion by a normal
 *     error of SD line_angle_sd_deg;
 *  3. magnification: a sampled M_s = M + N(0, magnification_sd), and every
 *     landmark coordinate scales by M / M_s about the hip centre (the
 *     distances of the hands and all option parameters are true lengths
 *     and do not scale).
 *
 * The teardrops (the midline direction) and the radiographic measures
 * (flags only) are not perturbed.  A sample in which native or any option
 * cannot be solved is dropped for all of them and counted.
 *
 * Percentiles: definition 7 of Hyndman & Fan 1996 ("Sample quantiles in
 * statistical packages", Am Stat 50:361-365; the default of R and NumPy):
 * with the n values sorted x_(0) <= ... <= x_(n-1), h = (n - 1) p and
 * Q(p) = x_(floor h) + (h - floor h) (x_(floor h + 1) - x_(floor h)).
 * gsl_stats_quantile_from_sorted_data is this definition; the two order
 * statistics it reads are put in place by gsl_stats_select (hl_quantiles).
 *
 * Random numbers: GSL's MT19937 generator (gsl_rng_mt19937; Matsumoto &
 * Nishimura 1998, ACM TOMACS 8:3-30) seeded with the plan's seed, normals
 * by GSL's ziggurat (gsl_ran_gaussian_ziggurat; Marsaglia & Tsang 2000,
 * J Stat Softw 5(8)).  The same seed gives the same ranges with the same
 * GSL version; another GSL version may draw differently.
 */
#pragma once

#include <stdbool.h>
#include <stdint.h>
#include "hl-mc-settings.h"
#include <gsl/gsl_rng.h>

#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

/* HlMcSettings: seed, samples, the three SDs and M (hl-mc-settings.h). */

/* The plan's recorded settings with M from its calibration.  Without a
 * calibration, or with one that cannot give a plausible M (too few points,
 * M outside HL_MAGNIFICATION_MIN..MAX), M is
 * HL_MAGNIFICATION_ASSUMED, as everywhere else, and *m_assumed (may be
 * NULL) is set. */
void hl_mc_settings_for_plan (const HlPlan *plan, HlMcSettings *settings,
                              bool *m_assumed);

typedef struct {
  double p05;
  double p50;
  double p95;
} HlPercentiles;

#define HL_MC_P_LOW  0.05
#define HL_MC_P_MID  0.50
#define HL_MC_P_HIGH 0.95

typedef struct {
  HlPercentiles abductor_force_n;
  HlPercentiles abductor_force_bw;
  HlPercentiles jrf_n;
  HlPercentiles jrf_bw;
  /* Share of the used samples in which this option's joint load is below
   * native's in the same sample; NaN for native itself. */
  double share_lower_jrf;
} HlMcSummary;

typedef struct {
  uint64_t seed;        /* the seed used, for the record */
  size_t n_used;        /* samples with every row solved */
  size_t n_dropped;     /* samples dropped because a row could not be solved */
} HlMcInfo;

typedef struct HlMcWorkspace HlMcWorkspace;

/* Room for up to max_samples samples of native and max_options options.
 * NULL when out of memory or the sizes are 0 or absurd. */
HlMcWorkspace *hl_mc_workspace_new (size_t max_samples, size_t max_options);
void hl_mc_workspace_free (HlMcWorkspace *ws);

/* Runs the Monte Carlo for native and options[0 .. n_options - 1] (as
 * plan->options, plan->n_options).
 * `summary` has room for 1 + n_options entries (summary[0] native).
 * Nothing is allocated; the workspace is overwritten. */
HlStatus hl_mc_run (HlMcWorkspace *ws, const HlModel *model,
                    const HlOption *options, size_t n_options,
                    const HlMcSettings *settings, HlMcSummary *summary,
                    HlMcInfo *info, HlError *err);

/* Percentiles (Hyndman & Fan definition 7) of a[0 .. n-1], reordering a in
 * place.  probs in [0, 1], any order; out gets one value per prob.  NaN
 * when n is 0. */
void hl_quantiles (double *a, size_t n, const double *probs, size_t n_probs,
                   double *out);

/* The generator of the Monte Carlo, and the seed it is given for a plan's
 * 64-bit seed (the two halves combined: MT19937 takes 32 bits). */
#define HL_MC_GENERATOR gsl_rng_mt19937
unsigned long hl_mc_generator_seed (uint64_t seed);

#ifdef __cplusplus
}
#endif

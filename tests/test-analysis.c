/* test-analysis.c: root finder, capacity, inverse questions, sweeps and
 * Monte Carlo ranges.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The base geometry is that of hl-test-util.h (native joint load about
 * 2.60 BW, abductor arm 52.84 mm, F_a 1278 N; worked in test-solve.c).
 * Inverse answers are checked by plugging them back into the forward
 * solve of a freshly prepared plan, never against the analysis code.
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-analysis.h"
#include "hl-bench.h"
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <gsl/gsl_statistics_double.h>

#include "hl-test-util.h"

#define N_ELEMENTS(a) (sizeof (a) / sizeof ((a)[0]))

/* An answer is within HL_ROOT_EPSABS_DEFAULT (1e-6) of the true root; the
 * goal quantities change by at most about 1.5 per unit of the unknown
 * (mm per mm, or BW per kg times g / BW), so they meet the goal within: */
#define TOL_GOAL_MM 1e-5
#define TOL_GOAL_BW 1e-5
/* A step this far beyond the answer must miss the goal: the answer is the
 * boundary, not just some point that meets the goal. */
#define STEP_BEYOND 1e-4
/* Two paths to the same number (perturbed model vs. prepared plan). */
#define TOL_SAME_REL 1e-9

/* ---- Root finder ------------------------------------------------------ */

typedef struct {
  const char *name;
  double (*f) (double);
  double lower, upper;
  double root;            /* closed form */
} RootCase;

static double f_cubic (double x) { return x * x * x - 2.0; }
static double f_cos (double x) { return cos (x) - x; }
static double f_linear (double x) { return 2.385 * (x - 1.2345); }
static double f_exp (double x) { return exp (x) - 3.0; }
static double f_flat_then_steep (double x) { return x < 0.7 ? -1e-3 : (x - 0.7) * 1e3 - 1e-3; }

static const RootCase root_cases[] = {
  { "cube root of 2", f_cubic, 0.0, 2.0, 1.2599210498948732 },
  /* the Dottie number, the fixed point of cos: 0.7390851332151607 */
  { "cos x = x", f_cos, 0.0, 1.0, 0.7390851332151607 },
  { "linear", f_linear, -10.0, 10.0, 1.2345 },
  { "ln 3", f_exp, -1.0, 3.0, 1.0986122886681098 },
  { "kink", f_flat_then_steep, 0.0, 1.0, 0.700001 },
};

static HlStatus
root_case_fn (double x, void *data, double *f, HlError *err)
{
  const RootCase *c = data;
  (void) err;
  *f = c->f (x);
  return HL_OK;
}

START_TEST (test_root_table)
{
  static const HlRootMethod methods[] = { HL_ROOT_BISECTION, HL_ROOT_BRENT };
  const RootCase *c = &root_cases[_i / 2];
  HlRootMethod method = methods[_i % 2];
  HlRootSolver s;
  HlError err = { 0 };

  HlStatus st = hl_root_find (&s, method, root_case_fn, (void *) c, c->lower,
                              c->upper, HL_ROOT_EPSABS_DEFAULT, 0.0,
                              HL_ROOT_MAX_ITER_DEFAULT, &err);
  ck_assert_msg (st == HL_OK, "%s (%s): %s", c->name,
                 hl_root_method_name (method), err.message);
  ck_assert (s.x_lower <= c->root + 1e-12 && c->root <= s.x_upper + 1e-12);
  ck_assert_double_le (s.x_upper - s.x_lower, HL_ROOT_EPSABS_DEFAULT);
  ck_assert_double_eq_tol (s.root, c->root, HL_ROOT_EPSABS_DEFAULT);
  /* the bracket keeps opposite signs at its ends */
  ck_assert (s.f_lower * s.f_upper <= 0.0);
}
END_TEST

START_TEST (test_root_brent_is_faster)
{
  HlRootSolver a, b;
  const RootCase *c = &root_cases[1];

  ck_assert_int_eq (hl_root_find (&a, HL_ROOT_BISECTION, root_case_fn, (void *) c,
                                  c->lower, c->upper, 1e-10, 0.0, 200, NULL), HL_OK);
  ck_assert_int_eq (hl_root_find (&b, HL_ROOT_BRENT, root_case_fn, (void *) c,
                                  c->lower, c->upper, 1e-10, 0.0, 200, NULL), HL_OK);
  /* bisection halves a bracket of 1 down to 1e-10 in 34 steps */
  ck_assert_int_eq (a.iterations, 34);
  ck_assert_int_lt (b.iterations, a.iterations);
}
END_TEST

static HlStatus
root_fail_fn (double x, void *data, double *f, HlError *err)
{
  (void) data;
  if (x > 0.5)
    return hl_error_set (err, HL_ERR_DEGENERATE, "test", "cannot evaluate at %g", x);
  *f = x - 0.75;
  return HL_OK;
}

static HlStatus
root_nan_fn (double x, void *data, double *f, HlError *err)
{
  (void) data;
  (void) err;
  *f = x > 0.5 ? NAN : x - 0.75;
  return HL_OK;
}

START_TEST (test_root_errors)
{
  HlRootSolver s;
  HlError err = { 0 };
  const RootCase *c = &root_cases[0];

  /* no sign change */
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, 2.0,
                                  3.0, 1e-6, 0.0, 100, &err), HL_ERR_NOT_REACHABLE);
  ck_assert (hl_test_error_mentions (&err, "not reachable in range"));
  /* iteration limit */
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BISECTION, root_case_fn, (void *) c,
                                  0.0, 2.0, 1e-6, 0.0, 3, &err), HL_ERR_NOT_CONVERGED);
  ck_assert_int_eq (s.iterations, 3);
  ck_assert (hl_test_error_mentions (&err, "3 iterations"));
  /* bad brackets, tolerances, method and function */
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, 2.0,
                                  0.0, 1e-6, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "empty"));
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, NAN,
                                  1.0, 1e-6, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, 0.0,
                                  2.0, 0.0, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, 0.0,
                                  2.0, -1.0, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_case_fn, (void *) c, 0.0,
                                  2.0, 1e-6, 0.0, 0, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_root_find (&s, (HlRootMethod) 7, root_case_fn, (void *) c, 0.0,
                                  2.0, 1e-6, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, NULL, NULL, 0.0, 2.0, 1e-6, 0.0,
                                  100, &err), HL_ERR_INVALID);
  /* a failing function stops the solver with its own status */
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BISECTION, root_fail_fn, NULL, 0.0,
                                  0.6, 1e-6, 0.0, 100, &err), HL_ERR_DEGENERATE);
  ck_assert (hl_test_error_mentions (&err, "cannot evaluate"));
  ck_assert_int_eq (hl_root_find (&s, HL_ROOT_BRENT, root_nan_fn, NULL, 0.0, 1.0,
                                  1e-6, 0.0, 100, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "finite"));
}
END_TEST

START_TEST (test_root_exact_end)
{
  HlRootSolver s;
  const RootCase *c = &root_cases[2];

  for (int m = 0; m < 2; m++)
    {
      ck_assert_int_eq (hl_root_find (&s, (HlRootMethod) m, root_case_fn, (void *) c,
                                      1.2345, 4.0, 1e-6, 0.0, 100, NULL), HL_OK);
      ck_assert_double_eq (s.root, 1.2345);
      ck_assert_int_eq (hl_root_find (&s, (HlRootMethod) m, root_case_fn, (void *) c,
                                      -3.0, 1.2345, 1e-6, 0.0, 100, NULL), HL_OK);
      ck_assert_double_eq (s.root, 1.2345);
    }
}
END_TEST

typedef struct {
  double lower, upper, epsabs, epsrel;
  bool converged;
} IntervalCase;

static const IntervalCase interval_cases[] = {
  { 1.0, 1.0 + 5e-7, 1e-6, 0.0, true },
  { 1.0, 1.0 + 2e-6, 1e-6, 0.0, false },
  { 1000.0, 1000.5, 0.0, 1e-3, true },     /* relative: 1e-3 * 1000 = 1 */
  { -1000.5, -1000.0, 0.0, 1e-3, true },
  { -0.5, 0.5, 0.0, 1e-3, false },         /* across zero: no relative part */
  { 2.0, 1.0, 1.0, 0.0, false },           /* reversed */
  { 1.0, 1.1, -1.0, 0.0, false },          /* negative tolerance */
};

START_TEST (test_root_interval)
{
  const IntervalCase *c = &interval_cases[_i];
  ck_assert_int_eq (hl_root_test_interval (c->lower, c->upper, c->epsabs, c->epsrel),
                    c->converged);
  ck_assert (hl_root_test_residual (1e-7, 1e-6));
  ck_assert (!hl_root_test_residual (-2e-6, 1e-6));
}
END_TEST

/* ---- Percentiles ------------------------------------------------------ */

START_TEST (test_quantiles_definition)
{
  /* 1..10: definition 7 gives 1.45, 5.5 and 9.55 (R's quantile() default). */
  double a[10] = { 7, 3, 10, 1, 9, 2, 8, 4, 6, 5 };
  double p[3] = { 0.05, 0.5, 0.95 }, q[3];
  hl_quantiles (a, 10, p, 3, q);
  ck_assert_double_eq_tol (q[0], 1.45, 1e-12);
  ck_assert_double_eq_tol (q[1], 5.5, 1e-12);
  ck_assert_double_eq_tol (q[2], 9.55, 1e-12);

  double one[1] = { 2.385 };
  hl_quantiles (one, 1, p, 3, q);
  ck_assert_double_eq (q[0], 2.385);
  ck_assert_double_eq (q[2], 2.385);

  hl_quantiles (one, 0, p, 3, q);
  ck_assert (isnan (q[0]) && isnan (q[1]) && isnan (q[2]));

  double ends[5] = { 4, 2, 5, 1, 3 }, pe[2] = { 0.0, 1.0 };
  hl_quantiles (ends, 5, pe, 2, q);
  ck_assert_double_eq (q[0], 1.0);
  ck_assert_double_eq (q[1], 5.0);
}
END_TEST

/* Against GSL on fully sorted data (gsl_sort), random data with and
 * without ties, probabilities in any order. */
static const size_t quantile_sizes[] = { 1, 2, 3, 16, 17, 100, 1001, 4000 };

START_TEST (test_quantiles_vs_sort)
{
  size_t n = quantile_sizes[_i];
  double *a = malloc (n * sizeof *a), *b = malloc (n * sizeof *b);
  const double p[6] = { 0.95, 0.01, 0.5, 0.05, 0.99, 0.7385 };
  double q[6];
  gsl_rng *r = gsl_rng_alloc (gsl_rng_mt19937);

  ck_assert_ptr_nonnull (a);
  ck_assert_ptr_nonnull (b);
  ck_assert_ptr_nonnull (r);
  gsl_rng_set (r, 777 + n);
  for (int ties = 0; ties < 2; ties++)
    {
      for (size_t i = 0; i < n; i++)
        a[i] = b[i] = ties ? floor (gsl_rng_uniform (r) * 7.0)
                           : gsl_ran_gaussian_ziggurat (r, 1.0);
      gsl_sort (b, 1, n);
      hl_quantiles (a, n, p, 6, q);
      for (int j = 0; j < 6; j++)
        ck_assert_double_eq (q[j], gsl_stats_quantile_from_sorted_data (b, 1, n, p[j]));
      /* a is a permutation of the data */
      gsl_sort (a, 1, n);
      ck_assert_int_eq (memcmp (a, b, n * sizeof *a), 0);
    }
  gsl_rng_free (r);
  free (a);
  free (b);
}
END_TEST

/* ---- Capacity --------------------------------------------------------- */

START_TEST (test_capacity_presets)
{
  const HlCapacityPresetInfo *men = hl_capacity_preset_info (HL_CAPACITY_PRESET_YOUNG_MEN);
  const HlCapacityPresetInfo *women = hl_capacity_preset_info (HL_CAPACITY_PRESET_YOUNG_WOMEN);
  const HlCapacityPresetInfo *before = hl_capacity_preset_info (HL_CAPACITY_PRESET_BEFORE_SURGERY);
  const HlCapacityPresetInfo *after = hl_capacity_preset_info (HL_CAPACITY_PRESET_TWO_YEARS_AFTER);

  /* Sugimoto D et al. 2014, "Comparison of isokinetic hip abduction and
   * adduction peak torques and ratio between sexes", Clin J Sport Med
   * 24:422-428 (abstract read): males 1.29 +/- 0.24 N m/kg, females
   * 1.13 +/- 0.20 N m/kg at 60 deg/s. */
  ck_assert_double_eq (men->torque_nm_per_kg, 1.29);
  ck_assert_double_eq (women->torque_nm_per_kg, 1.13);
  ck_assert (!men->derived && !women->derived);
  ck_assert (hl_test_contains_ci (men->source, "Sugimoto"));
  ck_assert (hl_test_contains_ci (women->source, "Clin J Sport Med 24:422-428"));

  /* Rasch A, Dalen N, Berg HE 2010, "Muscle strength, gait, and balance in
   * 20 patients with hip osteoarthritis followed for 2 years after THA",
   * Acta Orthop 81:183-188 (abstract read): hip muscles 18% weaker before
   * surgery and 6% two years after, against the other side.  Derived. */
  ck_assert_double_eq_tol (before->torque_nm_per_kg, 0.82 * 1.13, 1e-12);
  ck_assert_double_eq_tol (after->torque_nm_per_kg, 0.94 * 1.13, 1e-12);
  ck_assert (before->derived && after->derived);
  ck_assert (hl_test_contains_ci (before->source, "Derived"));
  ck_assert (hl_test_contains_ci (after->source, "Acta Orthop 81:183-188"));

  /* The plan default is the young women's figure, labelled an assumption. */
  HlPlan *plan = hl_plan_new ();
  ck_assert_double_eq (plan->capacity.torque_nm_per_kg,
                       hl_capacity_preset_info (HL_CAPACITY_DEFAULT_PRESET)->torque_nm_per_kg);
  hl_plan_free (plan);
  ck_assert (hl_test_contains_ci (hl_capacity_assumption_text (), "assumption"));

  for (int i = 0; i < HL_CAPACITY_PRESET_N; i++)
    {
      const HlCapacityPresetInfo *info = hl_capacity_preset_info ((HlCapacityPreset) i);
      ck_assert_int_eq (info->preset, i);
      ck_assert_int_eq (hl_capacity_preset_from_key (info->key), i);
      ck_assert (strlen (info->label) > 0);
    }
  ck_assert_int_eq (hl_capacity_preset_from_key ("no-such-preset"), HL_CAPACITY_PRESET_N);
  ck_assert_int_eq (hl_capacity_preset_from_key (NULL), HL_CAPACITY_PRESET_N);
  ck_assert_ptr_null (hl_capacity_preset_info (HL_CAPACITY_PRESET_N));
}
END_TEST

/* Demand = F_a(option) / (torque * mass / native arm), for every option. */
START_TEST (test_capacity_demand)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlRecon lateral;
  HlResult native, res;

  hl_recon_init (&lateral);
  lateral.femoral_offset_mm = 6.5;
  hl_test_solve (plan, NULL, &native);
  hl_test_solve (plan, &lateral, &res);

  double cap_n = plan->capacity.torque_nm_per_kg * plan->mass_kg * 1000.0
                 / native.abductor_arm_mm;
  hl_ck_rel (native.demand, native.abductor_force_n / cap_n, TOL_SAME_REL, 0.0);
  hl_ck_rel (res.demand, res.abductor_force_n / cap_n, TOL_SAME_REL, 0.0);
  ck_assert_double_lt (res.demand, native.demand);
  ck_assert (!(native.flags & HL_FLAG_OVER_CAPACITY));

  /* 0.8 N m/kg: 58,000 N mm over 52.84 mm is 1,097.6 N < F_a 1,278 N */
  plan->capacity.torque_nm_per_kg = 0.8;
  hl_test_solve (plan, NULL, &native);
  ck_assert_double_gt (native.demand, 1.0);
  ck_assert (native.flags & HL_FLAG_OVER_CAPACITY);
  hl_plan_free (plan);
}
END_TEST

/* ---- Inverse questions ------------------------------------------------ */

static void
prepare (const HlPlan *plan, HlModel *model)
{
  HlError err = { 0 };
  HlStatus st = hl_model_prepare (model, plan, &err);
  ck_assert_msg (st == HL_OK, "prepare: %s", err.message);
}

typedef struct {
  const char *name;
  HlRecon recon;
} ReconCase;

static const ReconCase recon_cases[] = {
  { "none", { 0.0, 0.0, 0.0, 0.0, 0.0, 135.0 } },
  { "medialised cup", { 4.5, 0.0, 0.0, 0.0, 0.0, 135.0 } },
  { "lateralised cup, higher", { -3.2, 5.1, 0.0, 0.0, 0.0, 135.0 } },
  { "long head, varus", { 2.0, 1.0, 3.0, 1.5, 3.5, 127.0 } },
  { "short stem", { 0.0, -2.0, -4.0, -6.0, -3.5, 140.0 } },
};

START_TEST (test_inverse_offset_for_arm)
{
  const ReconCase *c = &recon_cases[_i / 2];
  HlRootMethod method = _i % 2 ? HL_ROOT_BRENT : HL_ROOT_BISECTION;
  HlPlan *plan = hl_test_base_plan (_i % 4 < 2 ? HL_SIDE_RIGHT : HL_SIDE_LEFT);
  HlModel model;
  HlInverseSettings s;
  HlInverseAnswer a;
  HlError err = { 0 };
  HlResult native, res;
  char words[256];

  prepare (plan, &model);
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.method = method;
  HlStatus st = hl_inverse_offset_for_arm (&model, &c->recon, &s, &a, &err);
  ck_assert_msg (st == HL_OK, "%s: %s", c->name, err.message);
  ck_assert_int_eq (a.status, HL_OK);

  HlRecon r = c->recon;
  r.femoral_offset_mm = a.value;
  hl_test_solve (plan, NULL, &native);
  hl_test_solve (plan, &r, &res);
  ck_assert_double_eq_tol (res.abductor_arm_mm, native.abductor_arm_mm, TOL_GOAL_MM);
  ck_assert_double_eq_tol (a.goal, native.abductor_arm_mm, TOL_GOAL_MM);
  ck_assert_double_eq_tol (a.achieved, native.abductor_arm_mm, TOL_GOAL_MM);
  if (c->recon.cup_medial_mm == 0.0 && c->recon.cup_superior_mm == 0.0
      && c->recon.head_length_mm == 0.0 && c->recon.femoral_length_mm == 0.0)
    ck_assert_double_eq_tol (a.value, 0.0, HL_ROOT_EPSABS_DEFAULT);

  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "restores the native abductor moment arm"));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_inverse_offset_for_global)
{
  const ReconCase *c = &recon_cases[_i];
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };
  HlResult res;

  prepare (plan, &model);
  HlStatus st = hl_inverse_offset_for_global (&model, &c->recon, NULL, &a, &err);
  ck_assert_msg (st == HL_OK, "%s: %s", c->name, err.message);
  ck_assert (!a.against_other_hip);

  /* closed form (model.md section 5): f_off + h sin a - c_med = 0 */
  double expect = c->recon.cup_medial_mm
                  - c->recon.head_length_mm * sin (c->recon.neck_shaft_angle_deg * M_PI / 180.0);
  ck_assert_double_eq_tol (a.value, expect, HL_ROOT_EPSABS_DEFAULT);
  HlRecon r = c->recon;
  r.femoral_offset_mm = a.value;
  hl_test_solve (plan, &r, &res);
  ck_assert_double_eq_tol (res.global_offset_change_mm, 0.0, TOL_GOAL_MM);
  hl_plan_free (plan);
}
END_TEST

/* With both hips measured, the goal is the other hip's global offset. */
START_TEST (test_inverse_offset_for_global_other_hip)
{
  HlPlan *plan = hl_plan_new ();
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };
  HlResult res;
  char words[256];

  hl_plan_set_demo_landmarks (plan);
  prepare (plan, &model);
  ck_assert (isfinite (model.other_global_offset_mm));
  ck_assert (isfinite (model.native_global_offset_mm));

  const HlRecon *recon = &recon_cases[3].recon;
  ck_assert_int_eq (hl_inverse_offset_for_global (&model, recon, NULL, &a, &err), HL_OK);
  ck_assert (a.against_other_hip);
  HlRecon r = *recon;
  r.femoral_offset_mm = a.value;
  hl_test_solve (plan, &r, &res);
  ck_assert_double_eq_tol (model.native_global_offset_mm + res.global_offset_change_mm,
                           model.other_global_offset_mm, TOL_GOAL_MM);
  ck_assert (!(res.flags & HL_FLAG_GLOBAL_OFFSET_REDUCED));
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "other hip"));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_inverse_offset_errors)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseSettings s;
  HlInverseAnswer a;
  HlError err = { 0 };
  char words[256];

  prepare (plan, &model);
  /* needs an option */
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, NULL, NULL, &a, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "option"));
  ck_assert_int_eq (hl_inverse_offset_for_global (&model, NULL, NULL, &a, &err),
                    HL_ERR_INVALID);

  /* a medialised cup needs more offset; none in 0.. 0.5 mm gives it */
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.lower = -20.0;
  s.upper = -10.0;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_NOT_REACHABLE);
  ck_assert_int_eq (a.status, HL_ERR_NOT_REACHABLE);
  ck_assert (isnan (a.value));
  ck_assert (hl_test_error_mentions (&err, "not reachable in range"));
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "not reachable in range"));

  /* an empty or broken range, bad scan or tolerance */
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.upper = s.lower;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "range"));
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.scan_steps = 0;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_INVALID);
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.epsabs = NAN;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_INVALID);
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.method = (HlRootMethod) 9;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_INVALID);

  /* iteration limit */
  hl_inverse_settings_default (HL_INVERSE_OFFSET_FOR_ARM, &model, &s);
  s.max_iter = 1;
  s.method = HL_ROOT_BISECTION;
  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &recon_cases[1].recon, &s, &a, &err),
                    HL_ERR_NOT_CONVERGED);
  ck_assert_int_eq (a.status, HL_ERR_NOT_CONVERGED);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "did not converge"));
  hl_plan_free (plan);
}
END_TEST

/* Where the offset range runs into unsolvable geometry (the line passing
 * medial to the hip centre), the scan steps over it. */
START_TEST (test_inverse_offset_past_degenerate)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };
  HlRecon r;
  HlResult native, res;

  hl_test_place (plan, HL_LM_ABDUCTOR_INSERTION, 40.0, -10.0);
  prepare (plan, &model);
  hl_recon_init (&r);
  r.cup_medial_mm = 3.0;
  r.femoral_offset_mm = -45.0;
  ck_assert_int_ne (hl_model_solve (&model, &r, &res, NULL), HL_OK);

  ck_assert_int_eq (hl_inverse_offset_for_arm (&model, &r, NULL, &a, &err), HL_OK);
  r.femoral_offset_mm = a.value;
  hl_test_solve (plan, NULL, &native);
  hl_test_solve (plan, &r, &res);
  ck_assert_double_eq_tol (res.abductor_arm_mm, native.abductor_arm_mm, TOL_GOAL_MM);
  hl_plan_free (plan);
}
END_TEST

static double
jrf_with_cane (const HlPlan *base, const HlRecon *recon, double cane_n)
{
  HlPlan *p = hl_plan_copy (base);
  HlResult res;
  ck_assert_ptr_nonnull (p);
  p->cane.enabled = true;
  p->cane.hand = HL_HAND_CONTRALATERAL;
  p->cane.unit = HL_FORCE_UNIT_N;
  p->cane.value = cane_n;
  hl_test_solve (p, recon, &res);
  hl_plan_free (p);
  return res.jrf_bw;
}

typedef struct {
  double target_bw;
  int option;            /* index into recon_cases, -1 native */
} TargetCase;

static const TargetCase cane_cases[] = {
  { 2.0, -1 }, { 1.5, -1 }, { 2.2, 1 }, { 1.75, 3 }, { 2.45, 4 }, { 0.95, 2 },
};

START_TEST (test_inverse_cane)
{
  const TargetCase *c = &cane_cases[_i / 2];
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  const HlRecon *recon = c->option < 0 ? NULL : &recon_cases[c->option].recon;
  HlModel model;
  HlInverseSettings s;
  HlInverseAnswer a;
  HlError err = { 0 };

  prepare (plan, &model);
  hl_inverse_settings_default (HL_INVERSE_CANE_FOR_JRF, &model, &s);
  s.method = _i % 2 ? HL_ROOT_BRENT : HL_ROOT_BISECTION;
  HlStatus st = hl_inverse_cane_for_jrf (&model, recon, c->target_bw, plan->cane.distance_mm, &s, &a, &err);
  ck_assert_msg (st == HL_OK, "target %g: %s", c->target_bw, err.message);
  ck_assert (!a.at_limit);
  ck_assert_double_gt (a.value, 0.0);

  /* meets the goal, and a slightly weaker push does not */
  double j = jrf_with_cane (plan, recon, a.value);
  ck_assert_double_le (j, c->target_bw);
  ck_assert_double_eq_tol (j, c->target_bw, TOL_GOAL_BW);
  ck_assert_double_gt (jrf_with_cane (plan, recon, a.value - STEP_BEYOND), c->target_bw);

  char words[256];
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "opposite hand"));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_inverse_cane_limits)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };
  HlResult res;
  char words[320];

  prepare (plan, &model);
  /* already met without a cane (native 2.60 BW) */
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, 2.7, plan->cane.distance_mm, NULL, &a, &err), HL_OK);
  ck_assert (a.at_limit);
  ck_assert_double_eq (a.value, 0.0);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "already"));

  /* Not reachable: the abductors stop being needed at 95 BW mm / 375 mm
   * = 180.1 N, where the joint load is W_s - C = 0.585 BW; no cane up to
   * body weight gets it to 0.5 BW while the model applies. */
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, 0.5, plan->cane.distance_mm, NULL, &a, &err),
                    HL_ERR_NOT_REACHABLE);
  ck_assert (a.range_limited);
  ck_assert_double_eq_tol (a.upper, 95.0 * model.body_weight_n / 375.0, 1e-4);
  ck_assert_double_eq_tol (a.achieved, (model.w_s_n - a.upper) / model.body_weight_n, 1e-4);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "not reachable in range"));
  ck_assert (hl_test_contains_ci (words, "no longer needed"));

  /* the lowest reachable joint load is reached just below the limit */
  double j = jrf_with_cane (plan, NULL, a.upper);
  ck_assert_double_eq_tol (j, a.achieved, 1e-6);
  hl_test_solve (plan, NULL, &res);

  /* bad targets and ranges */
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, NAN, plan->cane.distance_mm, NULL, &a, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "target"));
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, -1.0, plan->cane.distance_mm, NULL, &a, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, 25.0, plan->cane.distance_mm, NULL, &a, &err), HL_ERR_INVALID);
  HlInverseSettings s;
  hl_inverse_settings_default (HL_INVERSE_CANE_FOR_JRF, &model, &s);
  s.lower = -10.0;
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, 2.0, plan->cane.distance_mm, &s, &a, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "push up"));
  ck_assert_int_eq (hl_inverse_cane_for_jrf (&model, NULL, 2.0, -5.0, NULL, &a, &err),
                    HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "distance"));
  hl_plan_free (plan);
}
END_TEST

static double
jrf_with_load (const HlPlan *base, const HlRecon *recon, HlLoadSite site, double kg)
{
  HlPlan *p = hl_plan_copy (base);
  HlResult res;
  ck_assert_ptr_nonnull (p);
  if (site == HL_LOAD_SITE_MIDLINE)
    p->loads.midline_kg = kg;
  else
    p->loads.hand[site].mass_kg = kg;
  hl_test_solve (p, recon, &res);
  hl_plan_free (p);
  return res.jrf_bw;
}

typedef struct {
  HlLoadSite site;
  double target_bw;
  int option;
} LoadCase;

static const LoadCase load_cases[] = {
  { HL_LOAD_SITE_CONTRALATERAL, 3.0, -1 },
  { HL_LOAD_SITE_CONTRALATERAL, 4.25, 1 },
  { HL_LOAD_SITE_CONTRALATERAL, 2.9, 3 },
  { HL_LOAD_SITE_MIDLINE, 3.0, -1 },
  { HL_LOAD_SITE_MIDLINE, 2.8, 4 },
};

START_TEST (test_inverse_load)
{
  const LoadCase *c = &load_cases[_i];
  HlPlan *plan = hl_test_base_plan (HL_SIDE_LEFT);
  const HlRecon *recon = c->option < 0 ? NULL : &recon_cases[c->option].recon;
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };

  prepare (plan, &model);
  HlStatus st = hl_inverse_load_for_jrf (&model, recon, c->site, c->target_bw, NULL, &a, &err);
  ck_assert_msg (st == HL_OK, "%s", err.message);
  ck_assert (!a.at_limit);
  double j = jrf_with_load (plan, recon, c->site, a.value);
  ck_assert_double_le (j, c->target_bw);
  ck_assert_double_eq_tol (j, c->target_bw, TOL_GOAL_BW);
  ck_assert_double_gt (jrf_with_load (plan, recon, c->site, a.value + STEP_BEYOND),
                       c->target_bw);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_inverse_load_limits)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };
  char words[320];

  prepare (plan, &model);
  /* A load in the same-side hand lowers this hip's load (as Bergmann,
   * Graichen & Rohlmann 1997, Clin Orthop 335:190-201 found: constant or
   * slightly lower) until the abductors are no longer needed. */
  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, HL_LOAD_SITE_IPSILATERAL, 2.7,
                                             NULL, &a, &err), HL_OK);
  ck_assert (a.at_limit);
  ck_assert (a.range_limited);
  ck_assert_double_lt (a.value, HL_HAND_LOAD_MAX_KG);
  ck_assert_double_le (jrf_with_load (plan, NULL, HL_LOAD_SITE_IPSILATERAL, a.value), 2.7);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "no longer needed"));

  /* the whole range: a midline load up to 100 kg keeps it below 20 BW */
  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, HL_LOAD_SITE_MIDLINE, 19.0,
                                             NULL, &a, &err), HL_OK);
  ck_assert (a.at_limit);
  ck_assert (!a.range_limited);
  ck_assert_double_eq (a.value, HL_HAND_LOAD_MAX_KG);

  /* over the target even with no load */
  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, HL_LOAD_SITE_CONTRALATERAL, 2.0,
                                             NULL, &a, &err), HL_ERR_NOT_REACHABLE);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "even with no load"));

  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, (HlLoadSite) 5, 3.0, NULL, &a,
                                             &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "site"));
  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, HL_LOAD_SITE_MIDLINE, 0.0, NULL,
                                             &a, &err), HL_ERR_INVALID);
  HlInverseSettings s;
  hl_inverse_settings_default (HL_INVERSE_LOAD_FOR_JRF, &model, &s);
  s.lower = -1.0;
  ck_assert_int_eq (hl_inverse_load_for_jrf (&model, NULL, HL_LOAD_SITE_MIDLINE, 3.0, &s,
                                             &a, &err), HL_ERR_INVALID);
  hl_plan_free (plan);
}
END_TEST

static double
demand_with_lean (const HlPlan *base, const HlRecon *recon, double lean)
{
  HlPlan *p = hl_plan_copy (base);
  HlResult res;
  ck_assert_ptr_nonnull (p);
  p->model.lean_mm = lean;
  hl_test_solve (p, recon, &res);
  hl_plan_free (p);
  return res.demand;
}

static const double lean_capacities[] = { 0.9, 0.6, 0.3, 0.12 };

START_TEST (test_inverse_lean)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  const HlRecon *recon = _i % 2 ? &recon_cases[2].recon : NULL;
  HlModel model;
  HlInverseAnswer a;
  HlError err = { 0 };

  plan->capacity.torque_nm_per_kg = lean_capacities[_i];
  prepare (plan, &model);
  ck_assert_double_gt (demand_with_lean (plan, recon, 0.0), 1.0);
  ck_assert_int_eq (hl_inverse_lean_for_capacity (&model, recon, NULL, &a, &err), HL_OK);
  ck_assert_double_gt (a.value, 0.0);
  ck_assert_double_le (demand_with_lean (plan, recon, a.value), 1.0);
  ck_assert_double_eq_tol (demand_with_lean (plan, recon, a.value), 1.0, TOL_GOAL_BW);
  ck_assert_double_gt (demand_with_lean (plan, recon, a.value - STEP_BEYOND), 1.0);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_inverse_lean_limits)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlModel model;
  HlInverseSettings s;
  HlInverseAnswer a;
  HlError err = { 0 };
  char words[256];

  prepare (plan, &model);
  /* default capacity: demand 0.82, within capacity without a lean */
  ck_assert_int_eq (hl_inverse_lean_for_capacity (&model, NULL, NULL, &a, &err), HL_OK);
  ck_assert (a.at_limit);
  ck_assert_double_eq (a.value, 0.0);
  hl_inverse_answer_format (&a, words, sizeof words);
  ck_assert (hl_test_contains_ci (words, "without a lean"));

  plan->capacity.torque_nm_per_kg = 0.3;
  prepare (plan, &model);
  hl_inverse_settings_default (HL_INVERSE_LEAN_FOR_CAPACITY, &model, &s);
  s.upper = 5.0;
  ck_assert_int_eq (hl_inverse_lean_for_capacity (&model, NULL, &s, &a, &err),
                    HL_ERR_NOT_REACHABLE);
  ck_assert_double_gt (a.achieved, 1.0);

  model.capacity_force_n = NAN;
  ck_assert_int_eq (hl_inverse_lean_for_capacity (&model, NULL, NULL, &a, &err),
                    HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "capacity"));
  hl_plan_free (plan);
}
END_TEST

/* ---- Sweeps ----------------------------------------------------------- */

typedef struct {
  HlSweepParam param;
  double from, to;
} SweepCase;

static const SweepCase sweep_cases[] = {
  { HL_SWEEP_CUP_MEDIAL, -6.5, 8.25 },
  { HL_SWEEP_CUP_SUPERIOR, -4.0, 9.5 },
  { HL_SWEEP_FEMORAL_OFFSET, -7.0, 12.5 },
  { HL_SWEEP_FEMORAL_LENGTH, -5.5, 6.0 },
  { HL_SWEEP_HEAD_LENGTH, -3.5, 7.0 },
  { HL_SWEEP_NECK_SHAFT_ANGLE, 123.0, 141.5 },
  { HL_SWEEP_CANE_FORCE_N, 12.5, 140.0 },
  { HL_SWEEP_CANE_PERCENT_BW, 2.5, 19.0 },
  { HL_SWEEP_LOAD_CONTRA_KG, 0.5, 22.0 },
  { HL_SWEEP_LOAD_IPSI_KG, 1.5, 12.0 },
  { HL_SWEEP_LOAD_MIDLINE_KG, 3.0, 17.5 },
  { HL_SWEEP_LEAN_MM, -8.0, 35.0 },
  { HL_SWEEP_MASS_KG, 48.5, 131.0 },
  { HL_SWEEP_ABDUCTOR_ANGLE_DEG, 58.0, 77.5 },
};

/* Two options, a %BW cane (so that mass changes it) and loads, so that
 * every parameter has something to act on. */
static HlPlan *
sweep_plan (HlSweepParam param)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_LEFT);
  ck_assert_int_ge (hl_plan_add_option (plan, "medialised", &recon_cases[1].recon), 0);
  ck_assert_int_ge (hl_plan_add_option (plan, "long head", &recon_cases[3].recon), 0);
  plan->cane.enabled = true;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = 7.5;
  plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = 4.0;
  plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 2.0;
  plan->loads.midline_kg = 3.0;
  if (param == HL_SWEEP_ABDUCTOR_ANGLE_DEG)
    plan->model.abductor_line = HL_ABDUCTOR_LINE_ANGLE;
  return plan;
}

static void
check_same_result (const HlResult *a, const HlResult *b)
{
  hl_ck_rel (a->abductor_force_n, b->abductor_force_n, TOL_SAME_REL, 1.0);
  hl_ck_rel (a->jrf_n, b->jrf_n, TOL_SAME_REL, 1.0);
  hl_ck_rel (a->jrf_bw, b->jrf_bw, TOL_SAME_REL, 1e-3);
  hl_ck_rel (a->jrf_x_n, b->jrf_x_n, TOL_SAME_REL, 1.0);
  hl_ck_rel (a->abductor_arm_mm, b->abductor_arm_mm, TOL_SAME_REL, 1.0);
  hl_ck_rel (a->demand, b->demand, TOL_SAME_REL, 1e-3);
  hl_ck_rel (a->global_offset_change_mm, b->global_offset_change_mm, TOL_SAME_REL, 1.0);
  ck_assert_uint_eq (a->flags, b->flags);
}

#define SWEEP_STEPS 37

START_TEST (test_sweep_endpoints)
{
  const SweepCase *c = &sweep_cases[_i];
  HlPlan *plan = sweep_plan (c->param);
  HlModel model;
  HlSweepSpec spec = { c->param, c->from, c->to, SWEEP_STEPS };
  const size_t rows = 1 + plan->n_options;
  HlResult results[3 * SWEEP_STEPS];
  HlStatus status[3 * SWEEP_STEPS];
  double values[SWEEP_STEPS];
  HlError err = { 0 };

  prepare (plan, &model);
  HlStatus st = hl_sweep_run (plan, &model, &spec, values, results, status,
                              N_ELEMENTS (results), &err);
  ck_assert_msg (st == HL_OK, "%s: %s", hl_sweep_param_info (c->param)->key, err.message);
  ck_assert_double_eq (values[0], c->from);
  ck_assert_double_eq (values[SWEEP_STEPS - 1], c->to);

  const size_t steps[3] = { 0, SWEEP_STEPS / 2, SWEEP_STEPS - 1 };
  for (size_t k = 0; k < N_ELEMENTS (steps); k++)
    {
      HlPlan *p = hl_plan_copy (plan);
      HlResult expect[3];
      ck_assert_ptr_nonnull (p);
      hl_sweep_plan_set (p, c->param, values[steps[k]]);
      hl_test_solve (p, NULL, &expect[0]);
      for (size_t o = 0; o < p->n_options; o++)
        hl_test_solve (p, &p->options[o].recon, &expect[1 + o]);
      for (size_t row = 0; row < rows; row++)
        {
          ck_assert_int_eq (status[row * SWEEP_STEPS + steps[k]], HL_OK);
          check_same_result (&results[row * SWEEP_STEPS + steps[k]], &expect[row]);
        }
      hl_plan_free (p);
    }
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_sweep_monotonic)
{
  HlPlan *plan = sweep_plan (HL_SWEEP_N);
  HlModel model;
  HlResult results[3 * SWEEP_STEPS];
  HlError err = { 0 };

  plan->cane.hand = HL_HAND_CONTRALATERAL;
  prepare (plan, &model);

  /* the joint load falls with a contralateral cane, up to where the
   * abductors stop being needed (about 180 N here) */
  HlSweepSpec cane = { HL_SWEEP_CANE_FORCE_N, 0.0, 150.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &cane, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_OK);
  for (size_t row = 0; row < 3; row++)
    for (size_t i = 1; i < SWEEP_STEPS; i++)
      ck_assert_double_lt (results[row * SWEEP_STEPS + i].jrf_n,
                           results[row * SWEEP_STEPS + i - 1].jrf_n);

  /* the abductor arm rises with femoral offset; native stays the reference */
  HlSweepSpec off = { HL_SWEEP_FEMORAL_OFFSET, -10.0, 15.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &off, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_OK);
  for (size_t i = 1; i < SWEEP_STEPS; i++)
    {
      ck_assert_double_eq (results[i].abductor_arm_mm, results[0].abductor_arm_mm);
      for (size_t row = 1; row < 3; row++)
        ck_assert_double_gt (results[row * SWEEP_STEPS + i].abductor_arm_mm,
                             results[row * SWEEP_STEPS + i - 1].abductor_arm_mm);
    }
  hl_plan_free (plan);
}
END_TEST

/* --mode add: each option's row at value v is the option solved with v
 * added to its own setting (femoral offset and cup medialisation); the
 * native row stays the reference.  A non-option parameter cannot be
 * added, and an added range that leaves the accepted one is refused with
 * the option's name. */
START_TEST (test_sweep_add_mode)
{
  static const HlSweepParam params[] = { HL_SWEEP_FEMORAL_OFFSET, HL_SWEEP_CUP_MEDIAL };
  HlPlan *plan = sweep_plan (HL_SWEEP_N);
  HlModel model;
  HlResult results[3 * SWEEP_STEPS];
  double values[SWEEP_STEPS];
  HlError err = { 0 };

  prepare (plan, &model);
  for (size_t k = 0; k < N_ELEMENTS (params); k++)
    {
      HlSweepSpec spec = { params[k], -4.0, 4.0, SWEEP_STEPS, HL_SWEEP_MODE_ADD };
      ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, values, results, NULL,
                                      N_ELEMENTS (results), &err), HL_OK);
      HlResult native;
      ck_assert_int_eq (hl_model_solve (&model, NULL, &native, &err), HL_OK);
      for (size_t i = 0; i < SWEEP_STEPS; i++)
        {
          ck_assert_double_eq (results[i].jrf_n, native.jrf_n);
          for (size_t row = 1; row <= plan->n_options; row++)
            {
              HlRecon recon = plan->options[row - 1].recon;
              if (params[k] == HL_SWEEP_FEMORAL_OFFSET)
                recon.femoral_offset_mm += values[i];
              else
                recon.cup_medial_mm += values[i];
              HlResult want;
              ck_assert_int_eq (hl_model_solve (&model, &recon, &want, &err), HL_OK);
              ck_assert_double_eq (results[row * SWEEP_STEPS + i].jrf_n, want.jrf_n);
              ck_assert_double_eq (results[row * SWEEP_STEPS + i].abductor_arm_mm,
                                   want.abductor_arm_mm);
            }
        }
    }

  /* The two options' own settings differ, so add and set differ. */
  HlSweepSpec set = { HL_SWEEP_CUP_MEDIAL, -4.0, 4.0, SWEEP_STEPS, HL_SWEEP_MODE_SET };
  HlResult set_results[3 * SWEEP_STEPS];
  ck_assert_int_eq (hl_sweep_run (plan, &model, &set, NULL, set_results, NULL,
                                  N_ELEMENTS (set_results), &err), HL_OK);
  bool differ = false;
  for (size_t i = SWEEP_STEPS; i < 3 * SWEEP_STEPS; i++)
    differ |= set_results[i].jrf_n != results[i].jrf_n;
  ck_assert (differ);

  HlSweepSpec mass = { HL_SWEEP_MASS_KG, 60.0, 70.0, SWEEP_STEPS, HL_SWEEP_MODE_ADD };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &mass, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "mode set"));

  const HlSweepParamInfo *info = hl_sweep_param_info (HL_SWEEP_FEMORAL_OFFSET);
  HlSweepSpec wide = { HL_SWEEP_FEMORAL_OFFSET, 0.0, info->max, SWEEP_STEPS,
                       HL_SWEEP_MODE_ADD };
  plan->options[0].recon.femoral_offset_mm = 1.0;
  prepare (plan, &model);
  ck_assert_int_eq (hl_sweep_run (plan, &model, &wide, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, plan->options[0].name));
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_sweep_table)
{
  for (int i = 0; i < HL_SWEEP_N; i++)
    {
      const HlSweepParamInfo *info = hl_sweep_param_info ((HlSweepParam) i);
      ck_assert_int_eq (info->param, i);
      ck_assert_int_eq (hl_sweep_param_from_key (info->key), i);
      ck_assert (info->default_from < info->default_to);
      ck_assert (info->min <= info->default_from && info->default_to <= info->max);
      ck_assert_int_eq (info->per_option, i <= HL_SWEEP_NECK_SHAFT_ANGLE);
    }
  ck_assert_int_eq (hl_sweep_param_from_key ("femoral_offset_mm"), HL_SWEEP_FEMORAL_OFFSET);
  ck_assert_int_eq (hl_sweep_param_from_key ("lean_mm"), HL_SWEEP_LEAN_MM);
  ck_assert_int_eq (hl_sweep_param_from_key ("offset"), HL_SWEEP_N);
  ck_assert_int_eq (hl_sweep_param_from_key (NULL), HL_SWEEP_N);
  ck_assert_ptr_null (hl_sweep_param_info (HL_SWEEP_N));
}
END_TEST

START_TEST (test_sweep_errors)
{
  HlPlan *plan = sweep_plan (HL_SWEEP_N);
  HlModel model;
  HlResult results[3 * SWEEP_STEPS];
  HlError err = { 0 };

  prepare (plan, &model);
  HlSweepSpec spec = { HL_SWEEP_FEMORAL_OFFSET, -5.0, 5.0, 1 };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "femoral_offset_mm"));
  ck_assert (hl_test_error_mentions (&err, "steps"));

  spec = (HlSweepSpec) { HL_SWEEP_FEMORAL_OFFSET, -5.0, 60.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "accepted range"));

  spec = (HlSweepSpec) { HL_SWEEP_MASS_KG, NAN, 80.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "finite"));

  spec = (HlSweepSpec) { HL_SWEEP_CANE_FORCE_N, 0.0, 2.0 * model.body_weight_n, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);

  spec = (HlSweepSpec) { HL_SWEEP_ABDUCTOR_ANGLE_DEG, 60.0, 70.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "abductor origin"));

  spec = (HlSweepSpec) { HL_SWEEP_LEAN_MM, 0.0, 10.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results) - 1, &err), HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "result array"));
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, NULL, NULL, 0, &err),
                    HL_ERR_INVALID);

  spec = (HlSweepSpec) { (HlSweepParam) 99, 0.0, 10.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, NULL,
                                  N_ELEMENTS (results), &err), HL_ERR_INVALID);
  hl_plan_free (plan);
}
END_TEST

/* Points that cannot be solved are NaN with their status; the rest of the
 * sweep is kept and the error names the option and value. */
START_TEST (test_sweep_unsolvable_points)
{
  HlPlan *plan = sweep_plan (HL_SWEEP_N);
  HlModel model;
  HlResult results[3 * SWEEP_STEPS];
  HlStatus status[3 * SWEEP_STEPS];
  HlError err = { 0 };

  hl_test_place (plan, HL_LM_ABDUCTOR_INSERTION, 40.0, -10.0);
  prepare (plan, &model);
  HlSweepSpec spec = { HL_SWEEP_FEMORAL_OFFSET, -50.0, 10.0, SWEEP_STEPS };
  ck_assert_int_eq (hl_sweep_run (plan, &model, &spec, NULL, results, status,
                                  N_ELEMENTS (results), &err), HL_ERR_DEGENERATE);
  ck_assert (hl_test_error_mentions (&err, "medialised"));
  ck_assert (hl_test_error_mentions (&err, "femoral_offset_mm = -50"));
  ck_assert_int_eq (status[1 * SWEEP_STEPS + 0], HL_ERR_DEGENERATE);
  ck_assert (isnan (results[1 * SWEEP_STEPS + 0].jrf_n));
  ck_assert_int_eq (status[0], HL_OK);
  ck_assert_int_eq (status[1 * SWEEP_STEPS + SWEEP_STEPS - 1], HL_OK);
  ck_assert (isfinite (results[1 * SWEEP_STEPS + SWEEP_STEPS - 1].jrf_n));
  hl_plan_free (plan);
}
END_TEST

/* ---- Monte Carlo ------------------------------------------------------ */

static HlPlan *
mc_plan (void)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlRecon same, lateral, worse;
  hl_recon_init (&same);
  hl_recon_init (&lateral);
  hl_recon_init (&worse);
  lateral.femoral_offset_mm = 8.0;
  worse.cup_medial_mm = -8.0;
  ck_assert_int_ge (hl_plan_add_option (plan, "same as native", &same), 0);
  ck_assert_int_ge (hl_plan_add_option (plan, "lateralised stem", &lateral), 0);
  ck_assert_int_ge (hl_plan_add_option (plan, "lateralised cup", &worse), 0);
  ck_assert_int_ge (hl_plan_add_option (plan, "long head", &recon_cases[3].recon), 0);
  /* A cane at a true distance: without forces at set distances a change
   * of scale alone changes no force (every arm scales alike). */
  plan->cane.enabled = true;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = 10.0;
  return plan;
}

static void
run_mc (const HlPlan *plan, const HlMcSettings *s, HlMcSummary *summary, HlMcInfo *info)
{
  HlModel model;
  HlError err = { 0 };
  HlMcWorkspace *ws = hl_mc_workspace_new (s->n_samples, plan->n_options);

  ck_assert_ptr_nonnull (ws);
  prepare (plan, &model);
  HlStatus st = hl_mc_run (ws, &model, plan->options, plan->n_options, s, summary,
                           info, &err);
  ck_assert_msg (st == HL_OK, "%s", err.message);
  hl_mc_workspace_free (ws);
}

START_TEST (test_mc_repeatable)
{
  HlPlan *plan = mc_plan ();
  HlMcSettings s;
  HlMcSummary a[5], b[5], c[5];
  HlMcInfo ia, ib;

  hl_mc_settings_init (&s);
  ck_assert_uint_eq (s.seed, HL_MC_SEED_DEFAULT);
  memset (a, 0, sizeof a);
  memset (b, 0, sizeof b);
  run_mc (plan, &s, a, &ia);
  run_mc (plan, &s, b, &ib);
  ck_assert_int_eq (memcmp (a, b, sizeof a), 0);   /* bit for bit */
  ck_assert_uint_eq (ia.seed, HL_MC_SEED_DEFAULT);
  ck_assert_uint_eq (ia.n_used + ia.n_dropped, s.n_samples);
  ck_assert_uint_eq (ia.n_dropped, 0);

  s.seed = HL_MC_SEED_DEFAULT + 1;
  run_mc (plan, &s, c, NULL);
  ck_assert (a[0].jrf_n.p50 != c[0].jrf_n.p50);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_mc_zero_error)
{
  HlPlan *plan = mc_plan ();
  HlMcSettings s;
  HlMcSummary sum[5];
  HlResult res;

  hl_mc_settings_init (&s);
  s.landmark_sd_mm = 0.0;
  s.magnification_sd = 0.0;
  s.line_angle_sd_deg = 0.0;
  s.n_samples = 257;
  run_mc (plan, &s, sum, NULL);
  for (size_t row = 0; row < 5; row++)
    {
      hl_test_solve (plan, row == 0 ? NULL : &plan->options[row - 1].recon, &res);
      const HlPercentiles *p[2] = { &sum[row].abductor_force_n, &sum[row].jrf_n };
      const double v[2] = { res.abductor_force_n, res.jrf_n };
      /* GSL interpolates as (1 - d) a + d b: equal values come back to
       * the last bit or next to it */
      for (int q = 0; q < 2; q++)
        {
          ck_assert_double_eq_tol (p[q]->p05, v[q], 1e-13 * v[q]);
          ck_assert_double_eq_tol (p[q]->p50, v[q], 1e-13 * v[q]);
          ck_assert_double_eq_tol (p[q]->p95, v[q], 1e-13 * v[q]);
        }
      ck_assert_double_eq_tol (sum[row].jrf_bw.p50, res.jrf_bw, 1e-12);
    }
  ck_assert (isnan (sum[0].share_lower_jrf));
  ck_assert_double_eq (sum[1].share_lower_jrf, 0.0);   /* same as native: never lower */
  ck_assert_double_eq (sum[2].share_lower_jrf, 1.0);   /* lateralised stem: always */
  ck_assert_double_eq (sum[3].share_lower_jrf, 0.0);
  hl_plan_free (plan);
}
END_TEST

/* Each error source alone spreads the range around the point result. */
START_TEST (test_mc_scale_alone)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlMcSettings s;
  HlMcSummary sum[1];
  HlResult native;

  /* weight and abductors only: F_a = W_s d_w / d_a does not depend on
   * scale, so a magnification error alone leaves the forces as they are */
  hl_test_solve (plan, NULL, &native);
  hl_mc_settings_init (&s);
  s.landmark_sd_mm = 0.0;
  s.line_angle_sd_deg = 0.0;
  s.n_samples = 500;
  run_mc (plan, &s, sum, NULL);
  hl_ck_rel (sum[0].abductor_force_n.p05, native.abductor_force_n, 1e-12, 0.0);
  hl_ck_rel (sum[0].abductor_force_n.p95, native.abductor_force_n, 1e-12, 0.0);
  hl_ck_rel (sum[0].jrf_n.p95, native.jrf_n, 1e-12, 0.0);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_mc_each_source)
{
  HlPlan *plan = mc_plan ();
  HlMcSettings s;
  HlMcSummary sum[5];
  HlResult native;

  hl_test_solve (plan, NULL, &native);
  for (int source = 0; source < 3; source++)
    {
      hl_mc_settings_init (&s);
      s.landmark_sd_mm = source == 0 ? HL_MC_LANDMARK_SD_MM_DEFAULT : 0.0;
      s.magnification_sd = source == 1 ? HL_MC_MAGNIFICATION_SD_DEFAULT : 0.0;
      s.line_angle_sd_deg = source == 2 ? HL_MC_LINE_ANGLE_SD_DEG_DEFAULT : 0.0;
      run_mc (plan, &s, sum, NULL);
      ck_assert_double_lt (sum[0].jrf_n.p05, sum[0].jrf_n.p50);
      ck_assert_double_lt (sum[0].jrf_n.p50, sum[0].jrf_n.p95);
      ck_assert_double_lt (sum[0].abductor_force_n.p05, native.abductor_force_n);
      ck_assert_double_gt (sum[0].abductor_force_n.p95, native.abductor_force_n);
      /* the spread is a few per cent, not tens */
      ck_assert_double_lt (sum[0].jrf_n.p95 - sum[0].jrf_n.p05, 0.5 * native.jrf_n);
    }
  hl_plan_free (plan);
}
END_TEST

/* Paired comparison: the same perturbation for native and option. */
START_TEST (test_mc_paired_share)
{
  HlPlan *plan = mc_plan ();
  HlMcSettings s;
  HlMcSummary sum[5];

  hl_mc_settings_init (&s);
  run_mc (plan, &s, sum, NULL);
  ck_assert_double_eq (sum[1].share_lower_jrf, 0.0);
  ck_assert_double_gt (sum[2].share_lower_jrf, 0.99);
  ck_assert_double_lt (sum[3].share_lower_jrf, 0.01);
  ck_assert (sum[4].share_lower_jrf >= 0.0 && sum[4].share_lower_jrf <= 1.0);
  hl_plan_free (plan);
}
END_TEST

/* 4,000 against 40,000 samples (independent seeds).  A sample quantile
 * has SE sqrt(p (1 - p) / n) / f(Q_p); for a near-normal output of SD
 * sigma that is 0.034 sigma at p = 0.05 or 0.95 and n = 4,000 (0.020
 * sigma at the median), and a third of it at 40,000.  The test measures
 * sigma from the range, (p95 - p05) / 3.29, checks that 3% of the median
 * is at least 5 combined SE (so it cannot fail by chance more than about
 * once in a million runs), then checks the agreement. */
#define MC_AGREE_REL 0.03
#define MC_SE_TAIL_4000 0.034
#define MC_SE_TAIL_40000 0.0108
#define MC_NORMAL_RANGE_90 3.29

START_TEST (test_mc_converges)
{
  HlPlan *plan = mc_plan ();
  HlMcSettings s;
  HlMcSummary small[5], big[5];

  hl_mc_settings_init (&s);
  run_mc (plan, &s, small, NULL);
  s.seed = 99991;
  s.n_samples = 40000;
  run_mc (plan, &s, big, NULL);

  for (size_t row = 0; row < 5; row++)
    {
      const HlPercentiles *a[2] = { &small[row].abductor_force_n, &small[row].jrf_n };
      const HlPercentiles *b[2] = { &big[row].abductor_force_n, &big[row].jrf_n };
      for (int q = 0; q < 2; q++)
        {
          double tol = MC_AGREE_REL * b[q]->p50;
          double sigma = (b[q]->p95 - b[q]->p05) / MC_NORMAL_RANGE_90;
          double se = hypot (MC_SE_TAIL_4000, MC_SE_TAIL_40000) * sigma;
          ck_assert_double_ge (tol, 5.0 * se);
          ck_assert_double_eq_tol (a[q]->p05, b[q]->p05, tol);
          ck_assert_double_eq_tol (a[q]->p50, b[q]->p50, tol);
          ck_assert_double_eq_tol (a[q]->p95, b[q]->p95, tol);
        }
    }
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_mc_dropped_samples)
{
  HlPlan *plan = hl_test_base_plan (HL_SIDE_RIGHT);
  HlRecon r;
  HlMcSettings s;
  HlMcSummary sum[2];
  HlMcInfo info;
  HlModel model;
  HlError err = { 0 };

  /* an option whose abductor line passes about 7 mm from the hip centre:
   * large placement errors make some samples unsolvable */
  hl_recon_init (&r);
  r.femoral_offset_mm = -48.0;
  ck_assert_int_ge (hl_plan_add_option (plan, "near the limit", &r), 0);
  hl_mc_settings_init (&s);
  s.landmark_sd_mm = 6.0;
  s.n_samples = 2000;
  run_mc (plan, &s, sum, &info);
  ck_assert_uint_gt (info.n_dropped, 0);
  ck_assert_uint_gt (info.n_used, 0);
  ck_assert_uint_eq (info.n_used + info.n_dropped, s.n_samples);

  /* none solvable: the error says so */
  prepare (plan, &model);
  HlMcWorkspace *ws = hl_mc_workspace_new (100, 1);
  model.midline.x = 5.0;
  s.n_samples = 100;
  s.landmark_sd_mm = 0.0;
  ck_assert_int_eq (hl_mc_run (ws, &model, plan->options, 1, &s, sum, &info, &err),
                    HL_ERR_DEGENERATE);
  ck_assert (hl_test_error_mentions (&err, "none of the 100 samples"));
  hl_mc_workspace_free (ws);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_mc_errors)
{
  HlPlan *plan = mc_plan ();
  HlModel model;
  HlMcSettings s;
  HlMcSummary sum[5];
  HlError err = { 0 };
  HlMcWorkspace *ws = hl_mc_workspace_new (1000, 4);

  prepare (plan, &model);
  ck_assert_ptr_null (hl_mc_workspace_new (0, 4));
  ck_assert_ptr_null (hl_mc_workspace_new (HL_MC_SAMPLES_MAX + 1, 4));
  hl_mc_workspace_free (NULL);

  hl_mc_settings_init (&s);
  s.n_samples = 1001;
  ck_assert_int_eq (hl_mc_run (ws, &model, plan->options, 4, &s, sum, NULL, &err),
                    HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "samples"));
  s.n_samples = 0;
  ck_assert_int_eq (hl_mc_run (ws, &model, plan->options, 4, &s, sum, NULL, &err),
                    HL_ERR_INVALID);

  hl_mc_settings_init (&s);
  s.n_samples = 1000;
  ck_assert_int_eq (hl_mc_run (ws, &model, plan->options, 5, &s, sum, NULL, &err),
                    HL_ERR_INVALID);
  ck_assert (hl_test_error_mentions (&err, "options"));
  ck_assert_int_eq (hl_mc_run (ws, &model, NULL, 2, &s, sum, NULL, &err), HL_ERR_INVALID);
  ck_assert_int_eq (hl_mc_run (NULL, &model, plan->options, 4, &s, sum, NULL, &err),
                    HL_ERR_INVALID);

  const struct { double *field; double value; const char *word; } cases[] = {
    { &s.landmark_sd_mm, -1.0, "landmark" },
    { &s.landmark_sd_mm, NAN, "landmark" },
    { &s.landmark_sd_mm, 25.0, "landmark" },
    { &s.magnification_sd, -0.01, "magnification" },
    { &s.magnification_sd, 0.5, "magnification" },
    { &s.line_angle_sd_deg, INFINITY, "angle" },
    { &s.line_angle_sd_deg, 45.0, "angle" },
    { &s.magnification, 0.5, "magnification" },
    { &s.magnification, NAN, "magnification" },
  };
  for (size_t i = 0; i < N_ELEMENTS (cases); i++)
    {
      hl_mc_settings_init (&s);
      s.n_samples = 1000;
      *cases[i].field = cases[i].value;
      ck_assert_int_eq (hl_mc_run (ws, &model, plan->options, 4, &s, sum, NULL, &err),
                        HL_ERR_INVALID);
      ck_assert_msg (hl_test_error_mentions (&err, cases[i].word), "%s", err.message);
    }
  hl_mc_workspace_free (ws);
  hl_plan_free (plan);
}
END_TEST

/* ---- Benchmark helper ------------------------------------------------- */

START_TEST (test_bench_runs)
{
  HlPlan *plan = hl_bench_demo_plan ();
  HlBenchResult res;
  HlError err = { 0 };

  ck_assert_ptr_nonnull (plan);
  ck_assert_uint_eq (plan->n_options, 4);
  ck_assert_int_eq (hl_bench_analysis (plan, 1, &res, &err), HL_OK);
  ck_assert_uint_eq (res.mc_samples, HL_MC_SAMPLES_DEFAULT);
  ck_assert_uint_eq (res.sweep_steps, HL_BENCH_SWEEP_STEPS);
  ck_assert (res.mc_ms >= 0.0 && isfinite (res.mc_ms));
  ck_assert_int_eq (hl_bench_analysis (plan, 0, &res, &err), HL_ERR_INVALID);
  hl_plan_free (plan);
}
END_TEST

static Suite *
analysis_suite (void)
{
  Suite *s = suite_create ("analysis");
  TCase *tc;

#define ADD_LOOP(name, test, n)                                             \
  tc = tcase_create (name);                                                 \
  tcase_add_loop_test (tc, test, 0, (int) (n));                             \
  suite_add_tcase (s, tc)
#define ADD(name, test)                                                     \
  tc = tcase_create (name);                                                 \
  tcase_add_test (tc, test);                                                \
  suite_add_tcase (s, tc)

  ADD_LOOP ("root table", test_root_table, 2 * N_ELEMENTS (root_cases));
  ADD ("root brent", test_root_brent_is_faster);
  ADD ("root errors", test_root_errors);
  ADD ("root exact end", test_root_exact_end);
  ADD_LOOP ("root interval", test_root_interval, N_ELEMENTS (interval_cases));
  ADD ("quantiles definition", test_quantiles_definition);
  ADD_LOOP ("quantiles vs sort", test_quantiles_vs_sort, N_ELEMENTS (quantile_sizes));
  ADD ("capacity presets", test_capacity_presets);
  ADD ("capacity demand", test_capacity_demand);
  ADD_LOOP ("inverse offset for arm", test_inverse_offset_for_arm,
            2 * N_ELEMENTS (recon_cases));
  ADD_LOOP ("inverse offset for global", test_inverse_offset_for_global,
            N_ELEMENTS (recon_cases));
  ADD ("inverse global other hip", test_inverse_offset_for_global_other_hip);
  ADD ("inverse offset errors", test_inverse_offset_errors);
  ADD ("inverse offset degenerate", test_inverse_offset_past_degenerate);
  ADD_LOOP ("inverse cane", test_inverse_cane, 2 * N_ELEMENTS (cane_cases));
  ADD ("inverse cane limits", test_inverse_cane_limits);
  ADD_LOOP ("inverse load", test_inverse_load, N_ELEMENTS (load_cases));
  ADD ("inverse load limits", test_inverse_load_limits);
  ADD_LOOP ("inverse lean", test_inverse_lean, N_ELEMENTS (lean_capacities));
  ADD ("inverse lean limits", test_inverse_lean_limits);
  ADD_LOOP ("sweep endpoints", test_sweep_endpoints, N_ELEMENTS (sweep_cases));
  ADD ("sweep monotonic", test_sweep_monotonic);
  ADD ("sweep table", test_sweep_table);
  ADD ("sweep add mode", test_sweep_add_mode);
  ADD ("sweep errors", test_sweep_errors);
  ADD ("sweep unsolvable points", test_sweep_unsolvable_points);
  ADD ("mc repeatable", test_mc_repeatable);
  ADD ("mc zero error", test_mc_zero_error);
  ADD ("mc scale alone", test_mc_scale_alone);
  ADD ("mc each source", test_mc_each_source);
  ADD ("mc paired share", test_mc_paired_share);
  ADD ("mc converges", test_mc_converges);
  ADD ("mc dropped samples", test_mc_dropped_samples);
  ADD ("mc errors", test_mc_errors);
  ADD ("bench", test_bench_runs);
  return s;
}

int
main (void)
{
  return hl_test_run (analysis_suite ());
}

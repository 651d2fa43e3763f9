/* test-property.c: properties of the solver over random valid geometries.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each family below draws HL_PROP_CASES plans from a fixed seed: a random
 * hip centre and operated side, landmarks scattered within the adult
 * proportions of model.md section 2 (typical values from memory, as that
 * section says), a random mass, stance-limb table, weight-line method, lean,
 * cane, hand loads and three reconstruction options.  For native and every
 * option:
 *
 *  - every number of the result is finite;
 *  - the free body is in equilibrium: the forces of hl_model_forces sum to
 *    zero and so do their moments about the hip centre, to
 *    HL_PROP_TOL_EQUILIBRIUM relative to the sum of the magnitudes (when the
 *    abductors are not needed, the moment left over is the reported
 *    unbalanced moment);
 *  - mirroring the plan left to right (hl_plan_mirror) leaves every result
 *    bit-identical, and mirrors every drawn force exactly (equal as numbers:
 *    the mirror of 0.0 is -0.0).  Bit-identical,
 *    not merely close: the mirror only negates plan x, the solver frame
 *    takes x_lat = -x for a right hip, and a negation is exact in IEEE
 *    arithmetic, so the solver sees the very same numbers.
 */
#include "config.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-measure.h"
#include <gsl/gsl_rng.h>
#include "hl-test-util.h"

#define HL_PROP_CASES 3000
#define HL_PROP_OPTIONS 3
/* The bound on the equilibrium residual, relative. */
#define HL_PROP_TOL_EQUILIBRIUM 1e-9

/* A failed property names the family, the case and the value, and stops
 * the test; passing checks cost nothing (ck_assert marks every pass). */
#define prop_check(cond, ...)                                              \
  do {                                                                     \
    if (!(cond))                                                           \
      ck_abort_msg (__VA_ARGS__);                                          \
  } while (0)

typedef struct {
  const char *name;
  uint64_t seed;
  bool angle_mode;     /* abductor line by angle through the insertion */
  bool teardrops;      /* both teardrops placed: a tilted midline */
  bool aids;           /* cane and hand loads */
  bool measures;       /* every radiographic landmark placed */
} Family;

static const Family families[] = {
  { "origin-to-insertion line, bare", 0x68697031u, false, false, false, false },
  { "set line angle, bare", 0x68697032u, true, false, false, false },
  { "teardrops and aids", 0x68697033u, false, true, true, false },
  { "every landmark, aids, set angle", 0x68697034u, true, true, true, true },
};
#define N_FAMILIES ((int) (sizeof families / sizeof families[0]))

/* The random plans' generator: GSL's MT19937, one per test process. */
static const gsl_rng *
rng_for (unsigned long seed)
{
  static gsl_rng *rng;
  if (rng == NULL)
    rng = gsl_rng_alloc (gsl_rng_mt19937);
  ck_assert_ptr_nonnull (rng);
  gsl_rng_set (rng, seed);
  return rng;
}

static double
uniform (const gsl_rng *rng, double lo, double hi)
{
  return lo + (hi - lo) * gsl_rng_uniform (rng);
}

static bool
coin (const gsl_rng *rng)
{
  return gsl_rng_uniform (rng) < 0.5;
}

/* Places a landmark from solver-frame coordinates relative to the hip. */
static void
place (HlPlan *plan, HlLandmarkId id, double x_lat, double y)
{
  hl_test_place (plan, id, x_lat, y);
}

static HlPlan *
random_plan (const gsl_rng *rng, const Family *fam)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);

  plan->side = coin (rng) ? HL_SIDE_RIGHT : HL_SIDE_LEFT;
  plan->mass_kg = uniform (rng, 40.0, 150.0);
  plan->model.limb_table = (HlLimbTable) gsl_rng_uniform_int (rng, HL_LIMB_N);
  plan->model.limb_fraction_custom = uniform (rng, 0.12, 0.22);
  plan->model.bw_line = coin (rng) ? HL_BW_LINE_SEGMENTAL : HL_BW_LINE_MIDLINE;
  plan->model.abductor_line = fam->angle_mode ? HL_ABDUCTOR_LINE_ANGLE
                                              : HL_ABDUCTOR_LINE_AUTO;
  plan->model.abductor_angle_deg = uniform (rng, 55.0, 80.0);
  plan->model.lean_mm = uniform (rng, 0.0, 30.0);

  double s = hl_test_side_sign (plan->side);
  memset (&plan->landmarks, 0, sizeof plan->landmarks);
  hl_landmarks_set (&plan->landmarks, HL_LM_HIP_CENTRE,
                    s * uniform (rng, 60.0, 130.0), uniform (rng, -40.0, 40.0));

  double mid_x = uniform (rng, -110.0, -80.0);
  place (plan, HL_LM_MIDLINE, mid_x, uniform (rng, -45.0, 0.0));
  if (!fam->angle_mode || coin (rng))
    place (plan, HL_LM_ABDUCTOR_ORIGIN, uniform (rng, 5.0, 35.0),
           uniform (rng, 75.0, 105.0));
  place (plan, HL_LM_ABDUCTOR_INSERTION, uniform (rng, 50.0, 70.0),
         uniform (rng, -20.0, 0.0));

  if (fam->teardrops)
    {
      /* A pelvis tilted by up to 5 degrees either way. */
      double tilt = uniform (rng, -0.087, 0.087);
      double td_x = uniform (rng, -40.0, -25.0), td_y = uniform (rng, -25.0, -10.0);
      double span = 2.0 * (td_x - mid_x);
      place (plan, HL_LM_TEARDROP, td_x, td_y);
      place (plan, HL_LM_TEARDROP_OTHER, td_x - span, td_y + span * tilt);
    }
  if (fam->measures)
    {
      double other = 2.0 * mid_x;   /* the other hip, mirrored about the midline */
      place (plan, HL_LM_LESSER_TROCHANTER, uniform (rng, 10.0, 25.0),
             uniform (rng, -65.0, -50.0));
      place (plan, HL_LM_LESSER_TROCHANTER_OTHER, other - uniform (rng, 10.0, 25.0),
             uniform (rng, -65.0, -50.0));
      place (plan, HL_LM_SHAFT_PROXIMAL, uniform (rng, 30.0, 45.0), uniform (rng, -90.0, -70.0));
      place (plan, HL_LM_SHAFT_DISTAL, uniform (rng, 20.0, 35.0), uniform (rng, -190.0, -170.0));
      place (plan, HL_LM_SHAFT_PROXIMAL_OTHER, other - uniform (rng, 30.0, 45.0),
             uniform (rng, -90.0, -70.0));
      place (plan, HL_LM_SHAFT_DISTAL_OTHER, other - uniform (rng, 20.0, 35.0),
             uniform (rng, -190.0, -170.0));
      place (plan, HL_LM_HIP_CENTRE_OTHER, other + uniform (rng, -3.0, 3.0),
             uniform (rng, -3.0, 3.0));

      plan->calibration.method = HL_CAL_MARKER;
      double r = uniform (rng, 13.0, 17.0), cx = uniform (rng, -300.0, 300.0);
      for (int i = 0; i < 3; i++)
        {
          double a = 2.0 * i + uniform (rng, 0.0, 1.0);
          plan->calibration.points[i] = (HlVec2) { cx + r * cos (a), r * sin (a) };
        }
      plan->calibration.n_points = 3;
    }

  if (fam->aids)
    {
      plan->cane.enabled = coin (rng);
      plan->cane.hand = coin (rng) ? HL_HAND_CONTRALATERAL : HL_HAND_IPSILATERAL;
      plan->cane.unit = (HlForceUnit) gsl_rng_uniform_int (rng, 3);
      double cane_n = uniform (rng, 0.0, 0.25) * hl_plan_body_weight (plan);
      plan->cane.value = hl_force_from_newtons (cane_n, plan->cane.unit, plan->mass_kg);
      plan->cane.distance_mm = uniform (rng, 200.0, 320.0);
      for (int h = 0; h < 2; h++)
        {
          plan->loads.hand[h].mass_kg = coin (rng) ? uniform (rng, 0.0, 20.0) : 0.0;
          plan->loads.hand[h].distance_mm = uniform (rng, 150.0, 300.0);
        }
      plan->loads.midline_kg = coin (rng) ? uniform (rng, 0.0, 15.0) : 0.0;
    }

  for (int i = 0; i < HL_PROP_OPTIONS; i++)
    {
      HlRecon recon;
      hl_recon_init (&recon);
      recon.cup_medial_mm = uniform (rng, -10.0, 10.0);
      recon.cup_superior_mm = uniform (rng, -10.0, 10.0);
      recon.femoral_offset_mm = uniform (rng, -10.0, 10.0);
      recon.femoral_length_mm = uniform (rng, -10.0, 10.0);
      recon.head_length_mm = uniform (rng, -5.0, 5.0);
      recon.neck_shaft_angle_deg = uniform (rng, 125.0, 140.0);
      char name[32];
      snprintf (name, sizeof name, "random option %d", i + 1);
      ck_assert_int_ge (hl_plan_add_option (plan, name, &recon), 0);
    }
  return plan;
}

static void
prepare (const HlPlan *plan, HlModel *model, const Family *fam, int k)
{
  HlError err = { 0 };
  HlStatus st = hl_model_prepare (model, plan, &err);
  prop_check (st == HL_OK, "%s, case %d: a valid geometry is refused: %s: %s",
              fam->name, k, err.field, err.message);
}

static void
solve (const HlModel *model, const HlPlan *plan, size_t i, HlResult *res,
       const Family *fam, int k)
{
  HlError err = { 0 };
  const HlRecon *recon = i == 0 ? NULL : &plan->options[i - 1].recon;
  HlStatus st = hl_model_solve (model, recon, res, &err);
  prop_check (st == HL_OK, "%s, case %d, option %zu: refused: %s: %s",
              fam->name, k, i, err.field, err.message);
}

/* Every double of a result, in one table for the finite and mirror checks. */
#define N_RESULT_VALUES 18
static void
result_values (const HlResult *r, double v[N_RESULT_VALUES])
{
  const double all[N_RESULT_VALUES] = {
    r->abductor_arm_mm, r->bw_arm_mm, r->lever_ratio, r->abductor_force_n,
    r->abductor_force_bw, r->jrf_x_n, r->jrf_y_n, r->jrf_n, r->jrf_bw,
    r->moment_ext_nmm, r->unbalanced_nmm, r->x_s_mm, r->demand,
    r->leg_length_change_mm, r->femoral_offset_change_mm,
    r->acetabular_offset_change_mm, r->global_offset_change_mm,
    r->abductor_length_change_mm,
  };
  memcpy (v, all, sizeof all);
}

START_TEST (test_results_finite)
{
  const Family *fam = &families[_i];
  const gsl_rng *rng = rng_for (fam->seed);

  for (int k = 0; k < HL_PROP_CASES; k++)
    {
      HlPlan *plan = random_plan (rng, fam);
      HlModel model;
      prepare (plan, &model, fam, k);
      for (size_t i = 0; i <= plan->n_options; i++)
        {
          HlResult res;
          double v[N_RESULT_VALUES];
          solve (&model, plan, i, &res, fam, k);
          result_values (&res, v);
          for (int j = 0; j < N_RESULT_VALUES; j++)
            prop_check (isfinite (v[j]), "%s, case %d, option %zu: value %d is %g",
                        fam->name, k, i, j, v[j]);
          prop_check (isfinite (hl_result_jrf_angle_deg (&res)),
                      "%s, case %d: joint force angle not finite", fam->name, k);
        }
      hl_plan_free (plan);
    }
}
END_TEST

static double
cross (HlVec2 a, HlVec2 b)
{
  return a.x * b.y - a.y * b.x;
}

START_TEST (test_equilibrium)
{
  const Family *fam = &families[_i];
  const gsl_rng *rng = rng_for (fam->seed);

  for (int k = 0; k < HL_PROP_CASES; k++)
    {
      HlPlan *plan = random_plan (rng, fam);
      HlModel model;
      prepare (plan, &model, fam, k);
      for (size_t i = 0; i <= plan->n_options; i++)
        {
          const HlRecon *recon = i == 0 ? NULL : &plan->options[i - 1].recon;
          HlResult res;
          HlForceSet fs;
          solve (&model, plan, i, &res, fam, k);
          hl_model_forces (&model, plan, recon, &res, &fs);

          /* Moments about the (option's) hip centre, plan frame. */
          HlVec2 sum = { 0.0, 0.0 };
          double moment = 0.0, force_scale = 0.0, moment_scale = 0.0;
          for (int j = 0; j < fs.n; j++)
            {
              HlVec2 r = { fs.f[j].point.x - fs.hip_centre.x,
                           fs.f[j].point.y - fs.hip_centre.y };
              HlVec2 f = fs.f[j].vector;
              sum.x += f.x;
              sum.y += f.y;
              moment += cross (r, f);
              force_scale += hypot (f.x, f.y);
              moment_scale += hypot (r.x, r.y) * hypot (f.x, f.y);
            }
          prop_check (hypot (sum.x, sum.y) <= HL_PROP_TOL_EQUILIBRIUM * force_scale,
                      "%s, case %d, option %zu: forces sum to (%g, %g) N of %g N",
                      fam->name, k, i, sum.x, sum.y, force_scale);

          /* Plan x is s times solver x, so plan-frame moments are s times
           * solver-frame ones. */
          double left_over = model.side_sign * res.unbalanced_nmm;
          prop_check (fabs (moment - left_over) <= HL_PROP_TOL_EQUILIBRIUM * moment_scale,
                      "%s, case %d, option %zu: moments sum to %g N mm (unbalanced "
                      "%g) of %g N mm", fam->name, k, i, moment, left_over, moment_scale);
          prop_check (res.abductor_force_n > 0.0 || (res.flags & HL_FLAG_ABDUCTORS_NOT_NEEDED),
                      "%s, case %d: zero abductor force without the flag", fam->name, k);

          /* The drawn forces are the solved ones. */
          prop_check (fs.f[0].kind == HL_FORCE_WEIGHT && fs.f[1].kind == HL_FORCE_ABDUCTOR
                      && fs.f[2].kind == HL_FORCE_JOINT,
                      "%s, case %d: force order", fam->name, k);
          const struct { const char *what; double a, b; } same[] = {
            { "abductor force", hypot (fs.f[1].vector.x, fs.f[1].vector.y),
              res.abductor_force_n },
            { "joint force", hypot (fs.f[2].vector.x, fs.f[2].vector.y), res.jrf_n },
            { "superincumbent weight", -fs.f[0].vector.y, model.w_s_n },
            { "joint force in BW", res.jrf_bw * hl_plan_body_weight (plan), res.jrf_n },
          };
          for (size_t j = 0; j < sizeof same / sizeof same[0]; j++)
            prop_check (fabs (same[j].a - same[j].b)
                        <= HL_TEST_TOL_REL * fmax (1.0, fabs (same[j].b)),
                        "%s, case %d, option %zu: %s drawn %.12g, solved %.12g",
                        fam->name, k, i, same[j].what, same[j].a, same[j].b);
        }
      hl_plan_free (plan);
    }
}
END_TEST

static bool
same_bits (double a, double b)
{
  return memcmp (&a, &b, sizeof a) == 0;
}

/* Exact equality as numbers: the mirror of a vertical force has x = -0.0
 * where the original has 0.0. */
static bool
same_value (double a, double b)
{
  return a == b || (isnan (a) && isnan (b));
}

static void
check_mirrored_measures (const HlPlan *a, const HlPlan *b, const Family *fam, int k)
{
  HlMeasures ma, mb;
  hl_measure (&a->landmarks, a->side, &ma);
  hl_measure (&b->landmarks, b->side, &mb);
  const double va[] = {
    ma.operated.acetabular_offset_mm, ma.operated.femoral_offset_mm,
    ma.operated.global_offset_mm, ma.operated.hip_centre_height_mm,
    ma.operated.leg_length_mm, ma.other.acetabular_offset_mm,
    ma.other.femoral_offset_mm, ma.other.global_offset_mm,
    ma.other.hip_centre_height_mm, ma.other.leg_length_mm,
    ma.leg_length_difference_mm, ma.global_offset_difference_mm,
  };
  const double vb[] = {
    mb.operated.acetabular_offset_mm, mb.operated.femoral_offset_mm,
    mb.operated.global_offset_mm, mb.operated.hip_centre_height_mm,
    mb.operated.leg_length_mm, mb.other.acetabular_offset_mm,
    mb.other.femoral_offset_mm, mb.other.global_offset_mm,
    mb.other.hip_centre_height_mm, mb.other.leg_length_mm,
    mb.leg_length_difference_mm, mb.global_offset_difference_mm,
  };
  for (size_t j = 0; j < sizeof va / sizeof va[0]; j++)
    prop_check (same_bits (va[j], vb[j]), "%s, case %d: measure %zu %.17g, mirrored %.17g",
                fam->name, k, j, va[j], vb[j]);
  prop_check (ma.side_contradiction == mb.side_contradiction,
              "%s, case %d: side contradiction changes with the mirror", fam->name, k);

  double m_a = NAN, m_b = NAN;
  bool as_a = false, as_b = false;
  HlError err = { 0 };
  prop_check (hl_calibration_magnification (&a->calibration, &m_a, &as_a, &err) == HL_OK,
              "%s, case %d: calibration: %s", fam->name, k, err.message);
  prop_check (hl_calibration_magnification (&b->calibration, &m_b, &as_b, &err) == HL_OK,
              "%s, case %d: mirrored calibration: %s", fam->name, k, err.message);
  prop_check (same_bits (m_a, m_b) && as_a == as_b,
              "%s, case %d: magnification %.17g, mirrored %.17g", fam->name, k, m_a, m_b);
}

START_TEST (test_mirror)
{
  const Family *fam = &families[_i];
  const gsl_rng *rng = rng_for (fam->seed);

  for (int k = 0; k < HL_PROP_CASES; k++)
    {
      HlPlan *plan = random_plan (rng, fam);
      HlPlan *mirror = hl_plan_copy (plan);
      ck_assert_ptr_nonnull (mirror);
      hl_plan_mirror (mirror);
      prop_check (mirror->side != plan->side, "%s, case %d: side kept", fam->name, k);

      HlModel ma, mb;
      prepare (plan, &ma, fam, k);
      prepare (mirror, &mb, fam, k);
      for (size_t i = 0; i <= plan->n_options; i++)
        {
          const HlRecon *recon = i == 0 ? NULL : &plan->options[i - 1].recon;
          HlResult ra, rb;
          double va[N_RESULT_VALUES], vb[N_RESULT_VALUES];
          solve (&ma, plan, i, &ra, fam, k);
          solve (&mb, mirror, i, &rb, fam, k);
          result_values (&ra, va);
          result_values (&rb, vb);
          for (int j = 0; j < N_RESULT_VALUES; j++)
            prop_check (same_bits (va[j], vb[j]),
                        "%s, case %d, option %zu: value %d is %.17g, mirrored %.17g",
                        fam->name, k, i, j, va[j], vb[j]);
          prop_check (ra.flags == rb.flags, "%s, case %d: flags %#x, mirrored %#x",
                      fam->name, k, ra.flags, rb.flags);

          HlForceSet fa, fb;
          hl_model_forces (&ma, plan, recon, &ra, &fa);
          hl_model_forces (&mb, mirror, recon, &rb, &fb);
          prop_check (fa.n == fb.n, "%s, case %d: %d forces, mirrored %d",
                      fam->name, k, fa.n, fb.n);
          for (int j = 0; j < fa.n; j++)
            prop_check (fa.f[j].kind == fb.f[j].kind
                        && same_value (fa.f[j].point.x, -fb.f[j].point.x)
                        && same_value (fa.f[j].point.y, fb.f[j].point.y)
                        && same_value (fa.f[j].vector.x, -fb.f[j].vector.x)
                        && same_value (fa.f[j].vector.y, fb.f[j].vector.y)
                        && same_value (fa.f[j].bw, fb.f[j].bw),
                        "%s, case %d, option %zu: force %d is not the mirror image",
                        fam->name, k, i, j);
        }
      if (fam->measures)
        check_mirrored_measures (plan, mirror, fam, k);

      /* Twice is the identity, bit for bit. */
      hl_plan_mirror (mirror);
      prop_check (mirror->side == plan->side
                  && memcmp (&mirror->landmarks, &plan->landmarks, sizeof plan->landmarks) == 0
                  && memcmp (mirror->calibration.points, plan->calibration.points,
                             sizeof plan->calibration.points) == 0,
                  "%s, case %d: mirroring twice changes the plan", fam->name, k);
      hl_plan_free (mirror);
      hl_plan_free (plan);
    }
}
END_TEST

static Suite *
property_suite (void)
{
  Suite *s = suite_create ("property");
  TCase *tc;

  tc = tcase_create ("finite");
  tcase_add_loop_test (tc, test_results_finite, 0, N_FAMILIES);
  suite_add_tcase (s, tc);

  tc = tcase_create ("equilibrium");
  tcase_add_loop_test (tc, test_equilibrium, 0, N_FAMILIES);
  suite_add_tcase (s, tc);

  tc = tcase_create ("mirror");
  tcase_add_loop_test (tc, test_mirror, 0, N_FAMILIES);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  return hl_test_run (property_suite ());
}

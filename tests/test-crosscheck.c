/* test-crosscheck.c: the solver against a general 3x3 linear solve (GSL).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Over thousands of random valid geometries, loads and options (fixed
 * seed), the equilibrium of the superincumbent body is set up here from
 * model.md alone, as three equations in F_a, J_x, J_y, and solved by LU
 * decomposition:
 *
 *   sum F_x = 0:            F_a u_x + J_x             = 0
 *   sum F_y = 0:            F_a u_y + J_y + sum V_i   = 0
 *   sum M about the hip:    F_a (p x u)_z + sum x_i V_i = 0
 *
 * with u the unit vector of the abductor line (origin to insertion, or the
 * set angle through the insertion), p any point on it, and V_i the signed
 * vertical external forces at x_i (solver frame: origin at the option's hip
 * centre, x_lat lateral, y superior).  J acts at the hip centre and has no
 * moment there.  Where the solve gives F_a < 0 the abductors are not
 * needed: the core must report F_a = 0 and J = -(sum of external forces).
 */
#include "config.h"

#include <gsl/gsl_linalg.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hl-test-util.h"

#define DEG_TO_RAD(d) ((d) * M_PI / 180.0)

#define XCHECK_SEED       20260611ul
#define XCHECK_SAMPLES    7000
#define XCHECK_MIN_SOLVED 5000
#define XCHECK_MIN_UNNEEDED 100
#define XCHECK_MIN_REFUSED 100
#define XCHECK_SHARE_DEGENERATE 0.05
/* Relative tolerance against the larger of the value and its scale (body
 * weight for forces, 1 mm for lengths, body weight times 100 mm for
 * moments): two exact methods in double precision. */
#define XCHECK_REL_TOL 1e-9
#define XCHECK_MOMENT_SCALE_MM 100.0

typedef struct {
  double x_lat, y;
} P;

/* One random case, kept in the solver frame of the native hip. */
typedef struct {
  HlSide side;
  double mass;
  HlLimbTable table;
  double custom;
  HlBwLine line;
  bool angle_mode;
  double angle_deg;
  double lean;
  P midline, origin, insertion;
  bool teardrops;
  P teardrop, teardrop_other;
  bool cane;
  HlHand cane_hand;
  HlForceUnit cane_unit;
  double cane_percent, cane_d;
  double load_kg[2], load_d[2], midline_kg;
  bool native;
  HlRecon recon;
} Sample;

static double
uniform (gsl_rng *r, double lo, double hi)
{
  return lo + (hi - lo) * gsl_rng_uniform (r);
}

static bool
coin (gsl_rng *r, double p)
{
  return gsl_rng_uniform (r) < p;
}

static void
draw (gsl_rng *r, Sample *s)
{
  memset (s, 0, sizeof *s);
  s->side = coin (r, 0.5) ? HL_SIDE_LEFT : HL_SIDE_RIGHT;
  s->mass = uniform (r, 40.0, 140.0);
  s->table = (HlLimbTable) gsl_rng_uniform_int (r, HL_LIMB_N);
  s->custom = uniform (r, 0.12, 0.22);
  s->line = coin (r, 0.5) ? HL_BW_LINE_MIDLINE : HL_BW_LINE_SEGMENTAL;
  s->angle_mode = coin (r, 0.3);
  s->angle_deg = uniform (r, 55.0, 80.0);
  s->lean = coin (r, 0.15) ? uniform (r, 60.0, 190.0) : uniform (r, -30.0, 40.0);
  s->midline = (P) { uniform (r, -125.0, -70.0), uniform (r, -60.0, 10.0) };
  s->origin = (P) { uniform (r, 0.0, 40.0), uniform (r, 65.0, 110.0) };
  s->insertion = (P) { uniform (r, 40.0, 80.0), uniform (r, -25.0, 10.0) };
  s->teardrops = coin (r, 0.3);
  if (s->teardrops)
    {
      double tilt = DEG_TO_RAD (uniform (r, -8.0, 8.0));
      double w = uniform (r, 100.0, 140.0);

      s->teardrop = (P) { uniform (r, 20.0, 45.0), uniform (r, -30.0, -10.0) };
      s->teardrop_other = (P) { s->teardrop.x_lat - w * cos (tilt),
                                s->teardrop.y + w * sin (tilt) };
    }
  s->cane = coin (r, 0.4);
  s->cane_hand = coin (r, 0.5) ? HL_HAND_IPSILATERAL : HL_HAND_CONTRALATERAL;
  s->cane_unit = (HlForceUnit) gsl_rng_uniform_int (r, 3);
  s->cane_percent = uniform (r, 0.0, 25.0);
  s->cane_d = uniform (r, 150.0, 350.0);
  for (int h = 0; h < 2; h++)
    if (coin (r, 0.4))
      {
        s->load_kg[h] = uniform (r, 0.0, 30.0);
        s->load_d[h] = uniform (r, 100.0, 350.0);
      }
  if (coin (r, 0.25))
    s->midline_kg = uniform (r, 0.0, 15.0);
  /* a share of geometries the model must refuse */
  if (coin (r, XCHECK_SHARE_DEGENERATE))
    {
      double t = DEG_TO_RAD (s->angle_deg);
      double arm = uniform (r, -4.5, 4.5);

      switch (gsl_rng_uniform_int (r, 3))
        {
        case 0:   /* a line through the hip centre, or nearly */
          s->insertion.x_lat = (arm - s->insertion.y * cos (t)) / sin (t);
          s->origin = (P) { s->insertion.x_lat - 90.0 * cos (t), s->insertion.y + 90.0 * sin (t) };
          break;
        case 1:   /* origin and insertion too close */
          s->angle_mode = false;
          s->origin = (P) { s->insertion.x_lat - uniform (r, 3.0, 12.0),
                            s->insertion.y + uniform (r, 3.0, 12.0) };
          break;
        default:  /* the midline on the operated side */
          s->midline.x_lat = uniform (r, 5.0, 40.0);
          break;
        }
    }
  s->native = coin (r, 0.3);
  hl_recon_init (&s->recon);
  if (!s->native)
    {
      s->recon.cup_medial_mm = uniform (r, -12.0, 12.0);
      s->recon.cup_superior_mm = uniform (r, -12.0, 12.0);
      s->recon.femoral_offset_mm = uniform (r, -15.0, 15.0);
      s->recon.femoral_length_mm = uniform (r, -15.0, 15.0);
      s->recon.head_length_mm = uniform (r, -4.0, 8.0);
      s->recon.neck_shaft_angle_deg = uniform (r, 120.0, 140.0);
    }
}

static HlPlan *
plan_of (const Sample *s)
{
  HlPlan *plan = hl_test_plan_new (s->side, s->mass);
  const double bw = s->mass * HL_GRAVITY;
  const double cane_n = s->cane_percent / 100.0 * bw;

  plan->model.limb_table = s->table;
  plan->model.limb_fraction_custom = s->custom;
  plan->model.bw_line = s->line;
  plan->model.abductor_line = s->angle_mode ? HL_ABDUCTOR_LINE_ANGLE : HL_ABDUCTOR_LINE_AUTO;
  plan->model.abductor_angle_deg = s->angle_deg;
  plan->model.lean_mm = s->lean;
  hl_test_place (plan, HL_LM_MIDLINE, s->midline.x_lat, s->midline.y);
  hl_test_place (plan, HL_LM_ABDUCTOR_ORIGIN, s->origin.x_lat, s->origin.y);
  hl_test_place (plan, HL_LM_ABDUCTOR_INSERTION, s->insertion.x_lat, s->insertion.y);
  if (s->teardrops)
    {
      hl_test_place (plan, HL_LM_TEARDROP, s->teardrop.x_lat, s->teardrop.y);
      hl_test_place (plan, HL_LM_TEARDROP_OTHER, s->teardrop_other.x_lat,
                     s->teardrop_other.y);
    }
  plan->cane.enabled = s->cane;
  plan->cane.hand = s->cane_hand;
  plan->cane.unit = s->cane_unit;
  plan->cane.value = s->cane_unit == HL_FORCE_UNIT_N ? cane_n
                     : s->cane_unit == HL_FORCE_UNIT_KG ? cane_n / HL_GRAVITY
                     : s->cane_percent;
  plan->cane.distance_mm = s->cane_d;
  for (int h = 0; h < 2; h++)
    plan->loads.hand[h] = (HlHandLoad) { s->load_kg[h], s->load_d[h] };
  plan->loads.midline_kg = s->midline_kg;
  return plan;
}

/* The reference: our own reading of model.md, solved by GSL. */
typedef struct {
  bool valid;          /* geometry the model can solve */
  double fa, jx, jy;   /* F_a may come out negative here */
  double arm, x_s, m_ext, sum_v;
} Reference;

static const double limb_fraction[HL_LIMB_N] = {
  [HL_LIMB_DEMPSTER] = 0.161,
  [HL_LIMB_PLAGENHOEF_MEN] = 0.1668,
  [HL_LIMB_PLAGENHOEF_WOMEN] = 0.1843,
  [HL_LIMB_DE_LEVA_MEN] = 0.1416 + 0.0433 + 0.0137,
  [HL_LIMB_DE_LEVA_WOMEN] = 0.1478 + 0.0481 + 0.0129,
  [HL_LIMB_SIXTH] = 1.0 / 6.0,
};

static void
reference (const Sample *s, Reference *out)
{
  const HlRecon *rc = &s->recon;
  const double a = DEG_TO_RAD (rc->neck_shaft_angle_deg);
  const double f_off = rc->femoral_offset_mm + rc->head_length_mm * sin (a);
  const double f_len = rc->femoral_length_mm - rc->head_length_mm * cos (a);
  const double f = s->table == HL_LIMB_CUSTOM ? s->custom : limb_fraction[s->table];
  const double bw = s->mass * HL_GRAVITY;
  /* pelvic points move by (+c_med, -c_sup), femoral ones by (+f_off, -f_len) */
  const P mid = { s->midline.x_lat + rc->cup_medial_mm, s->midline.y - rc->cup_superior_mm };
  const P org = { s->origin.x_lat + rc->cup_medial_mm, s->origin.y - rc->cup_superior_mm };
  const P ins = { s->insertion.x_lat + f_off, s->insertion.y - f_len };
  double ux, uy, len, x_mid, xv[5], v[5], sum_v = 0.0, m_ext = 0.0;
  int n = 0;

  memset (out, 0, sizeof *out);
  /* the midline runs perpendicular to the teardrop line (direction
   * (tx, ty)), i.e. along (-ty, tx); where it crosses the hip's height */
  x_mid = mid.x_lat;
  if (s->teardrops)
    {
      double tx = s->teardrop.x_lat - s->teardrop_other.x_lat;
      double ty = s->teardrop.y - s->teardrop_other.y;

      x_mid = mid.x_lat + mid.y * ty / tx;
    }

  if (s->angle_mode)
    {
      ux = cos (DEG_TO_RAD (s->angle_deg));
      uy = -sin (DEG_TO_RAD (s->angle_deg));
    }
  else
    {
      len = hypot (ins.x_lat - org.x_lat, ins.y - org.y);
      if (len < HL_MIN_ABDUCTOR_LENGTH_MM)
        return;
      ux = (ins.x_lat - org.x_lat) / len;
      uy = (ins.y - org.y) / len;
    }
  out->arm = -(ins.x_lat * uy - ins.y * ux);   /* positive: lateral of the hip */
  if (x_mid >= 0.0 || out->arm < HL_MIN_ABDUCTOR_ARM_MM)
    return;
  out->valid = true;

  out->x_s = x_mid * (s->line == HL_BW_LINE_SEGMENTAL ? 1.0 / (1.0 - f) : 1.0) + s->lean;
  xv[n] = out->x_s;
  v[n++] = -bw * (1.0 - f);
  if (s->cane)
    {
      xv[n] = s->cane_hand == HL_HAND_CONTRALATERAL ? x_mid - s->cane_d : x_mid + s->cane_d;
      v[n++] = s->cane_percent / 100.0 * bw;
    }
  xv[n] = x_mid - s->load_d[HL_HAND_CONTRALATERAL];
  v[n++] = -s->load_kg[HL_HAND_CONTRALATERAL] * HL_GRAVITY;
  xv[n] = x_mid + s->load_d[HL_HAND_IPSILATERAL];
  v[n++] = -s->load_kg[HL_HAND_IPSILATERAL] * HL_GRAVITY;
  xv[n] = x_mid;
  v[n++] = -s->midline_kg * HL_GRAVITY;
  for (int k = 0; k < n; k++)
    {
      sum_v += v[k];
      m_ext += xv[k] * v[k];
    }
  out->sum_v = sum_v;
  out->m_ext = m_ext;

  {
    double a_data[9] = {
      ux, 1.0, 0.0,
      uy, 0.0, 1.0,
      ins.x_lat * uy - ins.y * ux, 0.0, 0.0,
    };
    double b_data[3] = { 0.0, -sum_v, -m_ext };
    gsl_matrix_view am = gsl_matrix_view_array (a_data, 3, 3);
    gsl_vector_view bv = gsl_vector_view_array (b_data, 3);
    gsl_vector *x = gsl_vector_alloc (3);
    gsl_permutation *perm = gsl_permutation_alloc (3);
    int signum;

    ck_assert_ptr_nonnull (x);
    ck_assert_ptr_nonnull (perm);
    ck_assert_int_eq (gsl_linalg_LU_decomp (&am.matrix, perm, &signum), GSL_SUCCESS);
    ck_assert_int_eq (gsl_linalg_LU_solve (&am.matrix, perm, &bv.vector, x), GSL_SUCCESS);
    out->fa = gsl_vector_get (x, 0);
    out->jx = gsl_vector_get (x, 1);
    out->jy = gsl_vector_get (x, 2);
    gsl_permutation_free (perm);
    gsl_vector_free (x);
  }
}

/* The worst relative difference seen, and where. */
typedef struct {
  double worst;
  int worst_sample;
  const char *worst_what;
  double got, want;
} Tally;

static void
compare (Tally *t, int sample, const char *what, double got, double want, double scale)
{
  double rel = fabs (got - want) / fmax (fmax (fabs (got), fabs (want)), scale);

  if (!(rel <= t->worst))   /* NaN counts as worst */
    {
      t->worst = isnan (rel) ? INFINITY : rel;
      t->worst_sample = sample;
      t->worst_what = what;
      t->got = got;
      t->want = want;
    }
}

START_TEST (test_crosscheck)
{
  gsl_rng *rng = gsl_rng_alloc (gsl_rng_mt19937);
  Tally t = { 0.0, -1, "", 0.0, 0.0 };
  int solved = 0, unneeded = 0, refused = 0, wrong_status = 0, first_wrong = -1;

  ck_assert_ptr_nonnull (rng);
  gsl_rng_set (rng, XCHECK_SEED);
  for (int i = 0; i < XCHECK_SAMPLES; i++)
    {
      Sample s, native;
      Reference ref, ref_native;
      HlPlan *plan;
      HlModel model;
      HlResult res;
      HlError err = { 0 };
      HlStatus st;
      double bw;

      draw (rng, &s);
      reference (&s, &ref);
      native = s;
      native.native = true;
      hl_recon_init (&native.recon);
      reference (&native, &ref_native);
      plan = plan_of (&s);
      bw = s.mass * HL_GRAVITY;
      st = hl_model_prepare (&model, plan, &err);
      if (st == HL_OK)
        st = hl_model_solve (&model, s.native ? NULL : &s.recon, &res, &err);

      if (!ref.valid || !ref_native.valid)
        {
          /* refused by prepare (native) or by solve (the option) */
          refused++;
          if (st != HL_ERR_DEGENERATE && wrong_status++ == 0)
            first_wrong = i;
          hl_plan_free (plan);
          continue;
        }
      if (st != HL_OK)
        {
          if (wrong_status++ == 0)
            first_wrong = i;
          hl_plan_free (plan);
          continue;
        }
      solved++;
      compare (&t, i, "abductor arm", res.abductor_arm_mm, ref.arm, 1.0);
      compare (&t, i, "x_s", res.x_s_mm, ref.x_s, 1.0);
      compare (&t, i, "body-weight arm", res.bw_arm_mm, fabs (ref.x_s), 1.0);
      compare (&t, i, "external moment", res.moment_ext_nmm, ref.m_ext,
               bw * XCHECK_MOMENT_SCALE_MM);
      if (ref.fa >= 0.0)
        {
          compare (&t, i, "F_a", res.abductor_force_n, ref.fa, bw);
          compare (&t, i, "J_x", res.jrf_x_n, ref.jx, bw);
          compare (&t, i, "J_y", res.jrf_y_n, ref.jy, bw);
          compare (&t, i, "flag: needed", (res.flags & HL_FLAG_ABDUCTORS_NOT_NEEDED) != 0, 0, 1);
        }
      else
        {
          unneeded++;
          compare (&t, i, "F_a (not needed)", res.abductor_force_n, 0.0, bw);
          compare (&t, i, "J_x (not needed)", res.jrf_x_n, 0.0, bw);
          compare (&t, i, "J_y (not needed)", res.jrf_y_n, -ref.sum_v, bw);
          compare (&t, i, "unbalanced moment", fabs (res.unbalanced_nmm), fabs (ref.m_ext),
                   bw * XCHECK_MOMENT_SCALE_MM);
          compare (&t, i, "flag: not needed",
                   (res.flags & HL_FLAG_ABDUCTORS_NOT_NEEDED) != 0, 1, 1);
        }
      compare (&t, i, "|J|", res.jrf_n, hypot (res.jrf_x_n, res.jrf_y_n), bw);
      compare (&t, i, "J in BW", res.jrf_bw, res.jrf_n / bw, 1.0);
      compare (&t, i, "leg length", res.leg_length_change_mm,
               s.native ? 0.0 : hl_recon_total_length (&s.recon) - s.recon.cup_superior_mm, 1.0);
      compare (&t, i, "global offset", res.global_offset_change_mm,
               s.native ? 0.0 : hl_recon_total_offset (&s.recon) - s.recon.cup_medial_mm, 1.0);
      hl_plan_free (plan);
    }
  gsl_rng_free (rng);

  fprintf (stderr, "cross-check: %d solved (%d without abductors), %d refused, "
           "worst relative difference %.3g\n", solved, unneeded, refused, t.worst);
  ck_assert_msg (wrong_status == 0, "%d samples with an unexpected status, first #%d",
                 wrong_status, first_wrong);
  ck_assert_int_ge (solved, XCHECK_MIN_SOLVED);
  ck_assert_int_ge (unneeded, XCHECK_MIN_UNNEEDED);
  ck_assert_int_ge (refused, XCHECK_MIN_REFUSED);
  ck_assert_msg (t.worst <= XCHECK_REL_TOL, "sample #%d, %s: core %.15g, GSL %.15g",
                 t.worst_sample, t.worst_what, t.got, t.want);
}
END_TEST

static Suite *
crosscheck_suite (void)
{
  Suite *s = suite_create ("crosscheck");
  TCase *tc = tcase_create ("gsl");

  tcase_set_timeout (tc, 240);
  tcase_add_test (tc, test_crosscheck);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  return hl_test_run (crosscheck_suite ());
}

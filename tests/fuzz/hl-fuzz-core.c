/* hl-fuzz-core.c: fuzz target for the numerical core.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The bytes become the numbers of a plan: every numeric field, the
 * landmarks and which of them are placed, the enums (out-of-range values
 * included), the calibration and up to three options.  Each number is
 * either raw bits (NaN, infinities, denormals), a special value, or a value
 * in or just around its valid range, so that the fuzzer reaches both the
 * refusals and the solver.
 *
 * Properties: hl_model_prepare and hl_model_solve either succeed with
 * finite numbers everywhere (results and the drawn forces) or fail with a
 * field and a message; hl_measure on a checked plan never gives an
 * infinity; hl_calibration_magnification gives a finite factor in its
 * range or a message.
 */
#include "config.h"

#include <float.h>
#include <math.h>
#include <string.h>

#include "hl-fuzz.h"
#include "hl-measure.h"
#include "hl-plan.h"
#include "hl-solve.h"

#define HL_FUZZ_MAX_OPTIONS 3

typedef struct {
  const uint8_t *p;
  size_t n;
} Reader;

static uint8_t
next_u8 (Reader *r)
{
  if (r->n == 0)
    return 0;
  r->n--;
  return *r->p++;
}

static uint64_t
next_u64 (Reader *r)
{
  uint64_t v = 0;
  for (int i = 0; i < 8; i++)
    v = (v << 8) | next_u8 (r);
  return v;
}

/* Shares of the selector byte (out of 256) for each kind of number. */
#define HL_FUZZ_RAW_BELOW      8
#define HL_FUZZ_SPECIAL_BELOW 16
#define HL_FUZZ_AROUND_BELOW  48
/* "Around" the range: this fraction of its width beyond either end. */
#define HL_FUZZ_AROUND_MARGIN 0.25

static double
next_double (Reader *r, double lo, double hi)
{
  uint8_t sel = next_u8 (r);
  uint64_t bits = next_u64 (r);
  double unit = (double) (bits >> 11) * 0x1p-53;

  if (r->n == 0 && sel == 0)
    sel = UINT8_MAX;   /* exhausted input: quiet, in-range values */
  if (sel < HL_FUZZ_RAW_BELOW)
    {
      double d;
      memcpy (&d, &bits, sizeof d);
      return d;
    }
  if (sel < HL_FUZZ_SPECIAL_BELOW)
    {
      const double special[] = {
        0.0, -0.0, NAN, INFINITY, -INFINITY, lo, hi,
        nextafter (lo, -INFINITY), nextafter (hi, INFINITY),
        DBL_MAX, -DBL_MAX, DBL_MIN, DBL_TRUE_MIN, -DBL_TRUE_MIN,
      };
      return special[bits % (sizeof special / sizeof special[0])];
    }
  if (sel < HL_FUZZ_AROUND_BELOW)
    {
      double margin = (hi - lo) * HL_FUZZ_AROUND_MARGIN;
      return (lo - margin) + unit * (hi - lo + 2.0 * margin);
    }
  return lo + unit * (hi - lo);
}

/* Typical right-hip plan-frame positions (the invented demo geometry of
 * model.md section 2) around which landmarks are scattered. */
static const HlVec2 lm_centre[HL_LM_COUNT] = {
  [HL_LM_HIP_CENTRE] = { -95.0, 0.0 },
  [HL_LM_MIDLINE] = { 0.0, -35.0 },
  [HL_LM_ABDUCTOR_ORIGIN] = { -115.0, 90.0 },
  [HL_LM_ABDUCTOR_INSERTION] = { -155.0, -8.0 },
  [HL_LM_TEARDROP] = { -62.0, -18.0 },
  [HL_LM_TEARDROP_OTHER] = { 62.0, -18.0 },
  [HL_LM_LESSER_TROCHANTER] = { -115.0, -58.0 },
  [HL_LM_LESSER_TROCHANTER_OTHER] = { 114.0, -60.0 },
  [HL_LM_SHAFT_PROXIMAL] = { -131.0, -80.0 },
  [HL_LM_SHAFT_DISTAL] = { -123.0, -180.0 },
  [HL_LM_SHAFT_PROXIMAL_OTHER] = { 132.0, -79.0 },
  [HL_LM_SHAFT_DISTAL_OTHER] = { 124.0, -179.0 },
  [HL_LM_HIP_CENTRE_OTHER] = { 96.0, 1.0 },
};

/* How far landmarks scatter: from a careful user to anywhere at all. */
static const double lm_spread_mm[] = { 2.0, 20.0, 200.0, 2.5 * HL_COORD_MAX_MM };

static void
fill_landmarks (Reader *r, HlPlan *plan)
{
  uint8_t how = next_u8 (r);
  uint32_t placed = (uint32_t) next_u8 (r) << 8 | next_u8 (r);
  uint32_t all = (1u << HL_LM_COUNT) - 1u;
  double spread = lm_spread_mm[how % (sizeof lm_spread_mm / sizeof lm_spread_mm[0])];
  double mirror = (how & 0x10) ? -1.0 : 1.0;

  placed &= all;
  if (how & 0x20)
    for (int i = 0; i < HL_LM_COUNT; i++)
      if (hl_landmark_info ((HlLandmarkId) i)->required)
        placed |= 1u << i;
  memset (&plan->landmarks, 0, sizeof plan->landmarks);
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      double cx = mirror * lm_centre[i].x, cy = lm_centre[i].y;
      plan->landmarks.p[i].x = next_double (r, cx - spread, cx + spread);
      plan->landmarks.p[i].y = next_double (r, cy - spread, cy + spread);
    }
  plan->landmarks.placed = placed;
}

static void
fill_recon (Reader *r, HlRecon *recon)
{
  const double lim = HL_RECON_LINEAR_MAX_MM;
  recon->cup_medial_mm = next_double (r, -lim, lim);
  recon->cup_superior_mm = next_double (r, -lim, lim);
  recon->femoral_offset_mm = next_double (r, -lim, lim);
  recon->femoral_length_mm = next_double (r, -lim, lim);
  recon->head_length_mm = next_double (r, -lim, lim);
  recon->neck_shaft_angle_deg = next_double (r, HL_NECK_SHAFT_MIN_DEG,
                                             HL_NECK_SHAFT_MAX_DEG);
}

static bool
fill_plan (Reader *r, HlPlan *plan)
{
  plan->mass_kg = next_double (r, HL_MASS_MIN_KG, HL_MASS_MAX_KG);
  plan->side = (HlSide) (next_u8 (r) % 3);
  plan->model.limb_table = (HlLimbTable) (next_u8 (r) % (HL_LIMB_N + 1));
  plan->model.limb_fraction_custom = next_double (r, 0.05, 0.35);
  plan->model.bw_line = (HlBwLine) (next_u8 (r) % 3);
  plan->model.abductor_line = (HlAbductorLineMode) (next_u8 (r) % 3);
  plan->model.abductor_angle_deg = next_double (r, 30.0, 89.0);
  plan->model.lean_mm = next_double (r, HL_LEAN_MIN_MM, HL_LEAN_MAX_MM);

  fill_landmarks (r, plan);

  HlCalibration *cal = &plan->calibration;
  cal->method = (HlCalMethod) (next_u8 (r) % 5);
  cal->magnification = next_double (r, HL_MAGNIFICATION_MIN, HL_MAGNIFICATION_MAX);
  cal->marker_diameter_mm = next_double (r, 1.0, 50.0);
  cal->known_distance_mm = next_double (r, 1.0, 500.0);
  for (int i = 0; i < 3; i++)
    {
      cal->points[i].x = next_double (r, -40.0, 40.0);
      cal->points[i].y = next_double (r, -40.0, 40.0);
    }
  cal->n_points = next_u8 (r) % 6 - 1;   /* -1 and 4 are out of range */

  /* Cane forces around the valid range of each unit. */
  static const double cane_max[] = { 3500.0, 100.0, 350.0, 1.0 };
  plan->cane.enabled = next_u8 (r) & 1;
  plan->cane.hand = (HlHand) (next_u8 (r) % 3);
  plan->cane.unit = (HlForceUnit) (next_u8 (r) % 4);
  plan->cane.value = next_double (r, 0.0, cane_max[plan->cane.unit]);
  plan->cane.distance_mm = next_double (r, 0.0, HL_DISTANCE_MAX_MM);
  for (int h = 0; h < 2; h++)
    {
      plan->loads.hand[h].mass_kg = next_double (r, 0.0, HL_HAND_LOAD_MAX_KG);
      plan->loads.hand[h].distance_mm = next_double (r, 0.0, HL_DISTANCE_MAX_MM);
    }
  plan->loads.midline_kg = next_double (r, 0.0, HL_HAND_LOAD_MAX_KG);

  plan->tol.global_offset_drop_mm = next_double (r, 0.0, 50.0);
  plan->tol.leg_length_mm = next_double (r, 0.0, 50.0);
  plan->tol.abductor_slack_mm = next_double (r, 0.0, 50.0);
  plan->capacity.torque_nm_per_kg = next_double (r, 0.05, 5.0);

  int n_options = next_u8 (r) % (HL_FUZZ_MAX_OPTIONS + 1);
  for (int i = 0; i < n_options; i++)
    {
      HlRecon recon;
      hl_recon_init (&recon);
      fill_recon (r, &recon);
      char name[HL_NAME_MAX];
      snprintf (name, sizeof name, "Option %d", i + 1);
      if (hl_plan_add_option (plan, name, &recon) < 0)
        return false;
    }
  return true;
}

static void
check_failure (HlStatus st, const HlError *err, const char *what)
{
  HL_FUZZ_CHECK (st != HL_OK, "%s", what);
  HL_FUZZ_CHECK (err->status == st, "%s: err.status %d, returned %d", what,
                 err->status, st);
  HL_FUZZ_CHECK (err->message[0] != '\0', "%s failed (%s) without a message", what,
                 hl_status_name (st));
  HL_FUZZ_CHECK (err->field[0] != '\0', "%s failed without naming a field: %s",
                 what, err->message);
}

static void
check_result (const HlResult *r, const char *what)
{
  const struct { const char *name; double v; } v[] = {
    { "abductor arm", r->abductor_arm_mm }, { "bw arm", r->bw_arm_mm },
    { "lever ratio", r->lever_ratio }, { "abductor force", r->abductor_force_n },
    { "abductor force bw", r->abductor_force_bw }, { "jrf x", r->jrf_x_n },
    { "jrf y", r->jrf_y_n }, { "jrf", r->jrf_n }, { "jrf bw", r->jrf_bw },
    { "moment", r->moment_ext_nmm }, { "unbalanced", r->unbalanced_nmm },
    { "x_s", r->x_s_mm }, { "demand", r->demand },
    { "leg length", r->leg_length_change_mm },
    { "femoral offset", r->femoral_offset_change_mm },
    { "acetabular offset", r->acetabular_offset_change_mm },
    { "global offset", r->global_offset_change_mm },
    { "abductor length", r->abductor_length_change_mm },
    { "jrf angle", hl_result_jrf_angle_deg (r) },
  };
  for (size_t i = 0; i < sizeof v / sizeof v[0]; i++)
    HL_FUZZ_CHECK (isfinite (v[i].v), "%s: %s = %g", what, v[i].name, v[i].v);
  HL_FUZZ_CHECK (r->abductor_force_n >= 0.0, "%s: negative abductor force %g", what,
                 r->abductor_force_n);
  HL_FUZZ_CHECK (r->abductor_arm_mm >= HL_MIN_ABDUCTOR_ARM_MM,
                 "%s: abductor arm %g under the limit", what, r->abductor_arm_mm);
  HL_FUZZ_CHECK ((r->flags & ~((HL_FLAG_LAST << 1) - 1u)) == 0, "%s: unknown flags %#x",
                 what, r->flags);
}

static void
check_forces (const HlForceSet *fs, const char *what)
{
  HL_FUZZ_CHECK (fs->n >= 3 && fs->n <= HL_FORCE_N, "%s: %d forces", what, fs->n);
  for (int i = 0; i < fs->n; i++)
    HL_FUZZ_CHECK (isfinite (fs->f[i].point.x) && isfinite (fs->f[i].point.y)
                   && isfinite (fs->f[i].vector.x) && isfinite (fs->f[i].vector.y)
                   && isfinite (fs->f[i].bw),
                   "%s: force %d not finite", what, i);
  HL_FUZZ_CHECK (isfinite (fs->abductor_origin.x) && isfinite (fs->abductor_origin.y)
                 && isfinite (fs->abductor_insertion.x)
                 && isfinite (fs->abductor_insertion.y)
                 && isfinite (fs->hip_centre.x) && isfinite (fs->hip_centre.y)
                 && isfinite (fs->midline_x_at_hip),
                 "%s: drawing points not finite", what);
}

static void
check_measures (const HlPlan *plan)
{
  HlMeasures m;
  hl_measure (&plan->landmarks, plan->side, &m);

  const HlSideMeasures *s[2] = { &m.operated, &m.other };
  for (int i = 0; i < 2; i++)
    {
      HL_FUZZ_CHECK (!isinf (s[i]->acetabular_offset_mm), "acetabular offset inf");
      HL_FUZZ_CHECK (!isinf (s[i]->femoral_offset_mm), "femoral offset inf");
      HL_FUZZ_CHECK (!isinf (s[i]->global_offset_mm), "global offset inf");
      HL_FUZZ_CHECK (!isinf (s[i]->hip_centre_height_mm), "hip centre height inf");
      HL_FUZZ_CHECK (!isinf (s[i]->leg_length_mm), "leg length inf");
      HL_FUZZ_CHECK (isnan (s[i]->femoral_offset_mm) || s[i]->femoral_offset_mm >= 0.0,
                     "negative femoral offset %g", s[i]->femoral_offset_mm);
    }
  HL_FUZZ_CHECK (!isinf (m.leg_length_difference_mm)
                 && !isinf (m.global_offset_difference_mm)
                 && !isinf (m.femoral_offset_difference_mm)
                 && !isinf (m.acetabular_offset_difference_mm)
                 && !isinf (m.hip_centre_height_difference_mm),
                 "a side difference is infinite");
}

static void
check_calibration (const HlCalibration *cal)
{
  HlError err = { 0 };
  double m = NAN;
  bool assumed = false;
  HlStatus st = hl_calibration_magnification (cal, &m, &assumed, &err);

  if (st != HL_OK)
    {
      check_failure (st, &err, "hl_calibration_magnification");
      return;
    }
  HL_FUZZ_CHECK (isfinite (m) && m >= HL_MAGNIFICATION_MIN && m <= HL_MAGNIFICATION_MAX,
                 "magnification %g out of range", m);
  HL_FUZZ_CHECK (assumed == (cal->method == HL_CAL_ASSUMED), "assumed flag %d, method %d",
                 assumed, cal->method);
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  Reader r = { data, size };
  HlPlan *plan = hl_plan_new ();
  HlError err = { 0 };

  HL_FUZZ_CHECK (plan != NULL, "out of memory");
  if (!fill_plan (&r, plan))
    {
      hl_plan_free (plan);
      return 0;
    }

  check_calibration (&plan->calibration);

  HlModel model;
  HlStatus st = hl_model_prepare (&model, plan, &err);
  if (st != HL_OK)
    {
      check_failure (st, &err, "hl_model_prepare");
      hl_plan_free (plan);
      return 0;
    }
  check_measures (plan);

  for (size_t i = 0; i <= plan->n_options; i++)
    {
      const HlRecon *recon = i == 0 ? NULL : &plan->options[i - 1].recon;
      const char *what = i == 0 ? "native" : plan->options[i - 1].name;
      HlResult res;
      HlForceSet forces;

      hl_error_clear (&err);
      st = hl_model_solve (&model, recon, &res, &err);
      if (st != HL_OK)
        {
          HL_FUZZ_CHECK (i > 0, "native fails after a successful prepare: %s",
                         err.message);
          check_failure (st, &err, what);
          continue;
        }
      check_result (&res, what);
      hl_model_forces (&model, plan, recon, &res, &forces);
      check_forces (&forces, what);
    }

  hl_plan_free (plan);
  return 0;
}

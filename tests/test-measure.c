/* test-measure.c: radiographic measures, the circle through three points,
 * and magnification.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Definitions from model.md section 8 and hl-measure.h; every expected
 * value is worked by hand below.  Landmarks are invented.
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "hl-measure.h"
#include "hl-test-util.h"

#define N_ELEMENTS(a) (sizeof (a) / sizeof ((a)[0]))
#define DEG_TO_RAD(d) ((d) * M_PI / 180.0)

/* Results of a rigid motion of the landmarks: rounding only. */
#define TOL_MEASURE_MM 1e-9
#define TOL_MAGNIFICATION 1e-12

/* ---- Offsets, heights and leg lengths --------------------------------- */

/* A right hip, plan frame (x to the patient's left, y superior):
 *   teardrops (-60, -20) operated, (60, -20) other: a level line y = -20;
 *   hip centres (-95, 0) and (96, 1);
 *   lesser trochanter tips (-115, -58) and (114, -60);
 *   shaft axes (-131, -80)-(-123, -180) and (132, -79)-(124, -179).
 * Acetabular offset: |x_hc - x_td| = 35 and 36.  Hip centre height: 20 and
 * 21.  Leg length: 38 and 40.  Femoral offset: the axis direction is
 * (8, -100), |.| = 100.319490; hip centre from the proximal point (36, 80):
 * |36 (-100) - 80 (8)| / 100.319490 = 4240 / 100.319490 = 42.264968 on
 * both sides.  Global offset 77.264968 and 78.264968. */
typedef struct {
  HlLandmarkId id;
  HlVec2 p;
} Placed;

static const Placed level_right[] = {
  { HL_LM_HIP_CENTRE, { -95, 0 } },
  { HL_LM_TEARDROP, { -60, -20 } },
  { HL_LM_LESSER_TROCHANTER, { -115, -58 } },
  { HL_LM_SHAFT_PROXIMAL, { -131, -80 } },
  { HL_LM_SHAFT_DISTAL, { -123, -180 } },
  { HL_LM_HIP_CENTRE_OTHER, { 96, 1 } },
  { HL_LM_TEARDROP_OTHER, { 60, -20 } },
  { HL_LM_LESSER_TROCHANTER_OTHER, { 114, -60 } },
  { HL_LM_SHAFT_PROXIMAL_OTHER, { 132, -79 } },
  { HL_LM_SHAFT_DISTAL_OTHER, { 124, -179 } },
};

/* The same hip with a tilted inter-teardrop line: teardrops (-60, -23) and
 * (60, -17).  Unit direction (120, 6) / 120.149906 = (0.998752, 0.049938).
 * Operated hip centre from its teardrop (-35, 23): along the line
 * -35 (0.998752) + 23 (0.049938) = -33.807767, so acetabular offset
 * 33.807767; across it 0.998752 (23) + 0.049938 (35) = 24.719120 above.
 * Lesser trochanter from the same teardrop (-55, -35): across
 * 0.998752 (-35) + 0.049938 (55) = -32.209763, leg length 32.209763.
 * Other side, from (60, -17): hip centre (36, 18): along 36.853961, above
 * 16.179788; trochanter (54, -43): below 45.642982.  Femoral offsets as
 * above. */
static const Placed tilted_right[] = {
  { HL_LM_HIP_CENTRE, { -95, 0 } },
  { HL_LM_TEARDROP, { -60, -23 } },
  { HL_LM_LESSER_TROCHANTER, { -115, -58 } },
  { HL_LM_SHAFT_PROXIMAL, { -131, -80 } },
  { HL_LM_SHAFT_DISTAL, { -123, -180 } },
  { HL_LM_HIP_CENTRE_OTHER, { 96, 1 } },
  { HL_LM_TEARDROP_OTHER, { 60, -17 } },
  { HL_LM_LESSER_TROCHANTER_OTHER, { 114, -60 } },
  { HL_LM_SHAFT_PROXIMAL_OTHER, { 132, -79 } },
  { HL_LM_SHAFT_DISTAL_OTHER, { 124, -179 } },
};

typedef struct {
  double acetabular, femoral, global, height, leg;
} SideExpect;

typedef struct {
  const char *name;
  const Placed *set;
  size_t n;
  HlSide side;          /* HL_SIDE_LEFT: the set is mirrored about x = 0 */
  double turn_deg;      /* then turned about `pivot`: a rigid motion */
  HlVec2 pivot;
  SideExpect operated, other;
} MeasureCase;

#define LEVEL_OPERATED { 35.0, 42.264968, 77.264968, 20.0, 38.0 }
#define LEVEL_OTHER    { 36.0, 42.264968, 78.264968, 21.0, 40.0 }
#define TILT_OPERATED  { 33.807767, 42.264968, 76.072734, 24.719120, 32.209763 }
#define TILT_OTHER     { 36.853961, 42.264968, 79.118929, 16.179788, 45.642982 }

static const MeasureCase measure_cases[] = {
  { "right, level", level_right, N_ELEMENTS (level_right), HL_SIDE_RIGHT, 0, { 0, 0 },
    LEVEL_OPERATED, LEVEL_OTHER },
  { "right, pelvis turned 6.5 deg", level_right, N_ELEMENTS (level_right), HL_SIDE_RIGHT,
    6.5, { 10, -30 }, LEVEL_OPERATED, LEVEL_OTHER },
  { "right, pelvis turned -11 deg", level_right, N_ELEMENTS (level_right), HL_SIDE_RIGHT,
    -11.0, { -95, 0 }, LEVEL_OPERATED, LEVEL_OTHER },
  { "left, level", level_right, N_ELEMENTS (level_right), HL_SIDE_LEFT, 0, { 0, 0 },
    LEVEL_OPERATED, LEVEL_OTHER },
  { "left, pelvis turned 4 deg", level_right, N_ELEMENTS (level_right), HL_SIDE_LEFT,
    4.0, { 40, 15 }, LEVEL_OPERATED, LEVEL_OTHER },
  { "right, tilted teardrop line", tilted_right, N_ELEMENTS (tilted_right), HL_SIDE_RIGHT,
    0, { 0, 0 }, TILT_OPERATED, TILT_OTHER },
  { "left, tilted teardrop line", tilted_right, N_ELEMENTS (tilted_right), HL_SIDE_LEFT,
    0, { 0, 0 }, TILT_OPERATED, TILT_OTHER },
  { "left, tilted and turned -7.5 deg", tilted_right, N_ELEMENTS (tilted_right),
    HL_SIDE_LEFT, -7.5, { -20, 5 }, TILT_OPERATED, TILT_OTHER },
};

static void
place_set (HlLandmarks *lm, const MeasureCase *c)
{
  const double a = DEG_TO_RAD (c->turn_deg);

  memset (lm, 0, sizeof *lm);
  for (size_t k = 0; k < c->n; k++)
    {
      HlVec2 p = c->set[k].p;
      double dx, dy;

      if (c->side == HL_SIDE_LEFT)
        p.x = -p.x;
      dx = p.x - c->pivot.x;
      dy = p.y - c->pivot.y;
      hl_landmarks_set (lm, c->set[k].id,
                        c->pivot.x + dx * cos (a) - dy * sin (a),
                        c->pivot.y + dx * sin (a) + dy * cos (a));
    }
}

static void
check_side (const HlSideMeasures *m, const SideExpect *e)
{
  ck_assert_double_eq_tol (m->acetabular_offset_mm, e->acetabular, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m->femoral_offset_mm, e->femoral, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m->global_offset_mm, e->global, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m->hip_centre_height_mm, e->height, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m->leg_length_mm, e->leg, HL_TEST_TOL_MM);
}

START_TEST (test_measures)
{
  const MeasureCase *c = &measure_cases[_i];
  HlLandmarks lm;
  HlMeasures m;

  place_set (&lm, c);
  hl_measure (&lm, c->side, &m);
  ck_assert (!m.side_contradiction);
  /* a midline point between the hips changes no measure */
  hl_landmarks_set (&lm, HL_LM_MIDLINE, 0.5 * (lm.p[HL_LM_HIP_CENTRE].x
                                               + lm.p[HL_LM_HIP_CENTRE_OTHER].x), -35.0);
  hl_measure (&lm, c->side, &m);
  check_side (&m.operated, &c->operated);
  check_side (&m.other, &c->other);
  ck_assert_double_eq_tol (m.leg_length_difference_mm, c->operated.leg - c->other.leg,
                           HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m.global_offset_difference_mm,
                           c->operated.global - c->other.global, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m.femoral_offset_difference_mm,
                           c->operated.femoral - c->other.femoral, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m.acetabular_offset_difference_mm,
                           c->operated.acetabular - c->other.acetabular, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (m.hip_centre_height_difference_mm,
                           c->operated.height - c->other.height, HL_TEST_TOL_MM);
  ck_assert (!m.side_contradiction);
}
END_TEST

/* The operated hip centre placed on the other side of the midline than
 * the plan's side says (right plan, hip on the patient's left, and the
 * reverse) must be noticed. */
START_TEST (test_side_contradiction)
{
  const MeasureCase *c = &measure_cases[0];
  const HlSide wrong = _i ? HL_SIDE_RIGHT : HL_SIDE_LEFT;
  HlLandmarks lm;
  HlMeasures m;

  place_set (&lm, c);
  hl_landmarks_set (&lm, HL_LM_MIDLINE, 0.5, -35.0);
  if (wrong == HL_SIDE_RIGHT)
    for (int id = 0; id < HL_LM_COUNT; id++)
      lm.p[id].x = -lm.p[id].x;
  hl_measure (&lm, wrong, &m);
  ck_assert (m.side_contradiction);

  /* the same landmarks with the right side raise nothing */
  hl_measure (&lm, wrong == HL_SIDE_RIGHT ? HL_SIDE_LEFT : HL_SIDE_RIGHT, &m);
  ck_assert (!m.side_contradiction);
}
END_TEST

/* Without the landmarks a measure needs it is NaN, never a made-up 0. */
typedef struct {
  const char *name;
  HlLandmarkId unset;
  /* NaN expected: operated, then other side */
  bool acetabular[2], femoral[2], height[2], leg[2];
} MissingCase;

static const MissingCase missing_cases[] = {
  { "no distal shaft point", HL_LM_SHAFT_DISTAL,
    { false, false }, { true, false }, { false, false }, { false, false } },
  { "no other proximal shaft point", HL_LM_SHAFT_PROXIMAL_OTHER,
    { false, false }, { false, true }, { false, false }, { false, false } },
  { "no other lesser trochanter", HL_LM_LESSER_TROCHANTER_OTHER,
    { false, false }, { false, false }, { false, false }, { false, true } },
  { "no lesser trochanter", HL_LM_LESSER_TROCHANTER,
    { false, false }, { false, false }, { false, false }, { true, false } },
  { "no hip centre", HL_LM_HIP_CENTRE,
    { true, false }, { true, false }, { true, false }, { false, false } },
  { "no other hip centre", HL_LM_HIP_CENTRE_OTHER,
    { false, true }, { false, true }, { false, true }, { false, false } },
  { "no other teardrop", HL_LM_TEARDROP_OTHER,
    { false, true }, { false, false }, { false, false }, { false, false } },
  { "no operated teardrop", HL_LM_TEARDROP,
    { true, false }, { false, false }, { false, false }, { false, false } },
};

static void
check_nan (double value, bool expect_nan, const char *what, const char *name)
{
  ck_assert_msg (isnan (value) == expect_nan, "%s: %s is %g", name, what, value);
}

START_TEST (test_missing)
{
  const MissingCase *c = &missing_cases[_i];
  HlLandmarks lm;
  HlMeasures m;
  const HlSideMeasures *side[2] = { &m.operated, &m.other };

  place_set (&lm, &measure_cases[_i % 2 ? 5 : 0]);
  hl_landmarks_unset (&lm, c->unset);
  hl_measure (&lm, HL_SIDE_RIGHT, &m);
  for (int k = 0; k < 2; k++)
    {
      check_nan (side[k]->acetabular_offset_mm, c->acetabular[k], "acetabular offset", c->name);
      check_nan (side[k]->femoral_offset_mm, c->femoral[k], "femoral offset", c->name);
      check_nan (side[k]->global_offset_mm, c->acetabular[k] || c->femoral[k],
                 "global offset", c->name);
      check_nan (side[k]->hip_centre_height_mm, c->height[k], "hip centre height", c->name);
      check_nan (side[k]->leg_length_mm, c->leg[k], "leg length", c->name);
    }
  check_nan (m.leg_length_difference_mm, c->leg[0] || c->leg[1], "leg length difference",
             c->name);
  check_nan (m.femoral_offset_difference_mm, c->femoral[0] || c->femoral[1],
             "femoral offset difference", c->name);
}
END_TEST

/* With one teardrop the reference line is taken level through it, as the
 * midline is taken vertical without both teardrops (model.md section 2).
 * Tilted set, right hip.  Only the operated teardrop (-60, -23): hip
 * centre heights 23 and 24, leg lengths 35 and 37, acetabular offset 35
 * and (no teardrop) NaN.  Only the other teardrop (60, -17): heights 17
 * and 18, leg lengths 41 and 43, acetabular offsets NaN and 36. */
typedef struct {
  HlLandmarkId unset;
  double acetabular[2], height[2], leg[2];
} OneTeardropCase;

static const OneTeardropCase one_teardrop_cases[] = {
  { HL_LM_TEARDROP_OTHER, { 35.0, NAN }, { 23.0, 24.0 }, { 35.0, 37.0 } },
  { HL_LM_TEARDROP, { NAN, 36.0 }, { 17.0, 18.0 }, { 41.0, 43.0 } },
};

static void
check_value (double value, double expect)
{
  if (isnan (expect))
    ck_assert (isnan (value));
  else
    ck_assert_double_eq_tol (value, expect, HL_TEST_TOL_MM);
}

START_TEST (test_one_teardrop)
{
  const OneTeardropCase *c = &one_teardrop_cases[_i];
  HlLandmarks lm;
  HlMeasures m;
  const HlSideMeasures *side[2] = { &m.operated, &m.other };

  place_set (&lm, &measure_cases[5]);
  hl_landmarks_unset (&lm, c->unset);
  hl_measure (&lm, HL_SIDE_RIGHT, &m);
  for (int k = 0; k < 2; k++)
    {
      check_value (side[k]->acetabular_offset_mm, c->acetabular[k]);
      check_value (side[k]->hip_centre_height_mm, c->height[k]);
      check_value (side[k]->leg_length_mm, c->leg[k]);
      ck_assert_double_eq_tol (side[k]->femoral_offset_mm, 42.264968, HL_TEST_TOL_MM);
    }
  ck_assert_double_eq_tol (m.leg_length_difference_mm, c->leg[0] - c->leg[1], HL_TEST_TOL_MM);
}
END_TEST

START_TEST (test_nothing_placed)
{
  HlLandmarks lm;
  HlMeasures m;

  memset (&lm, 0, sizeof lm);
  hl_measure (&lm, _i ? HL_SIDE_LEFT : HL_SIDE_RIGHT, &m);
  ck_assert (isnan (m.operated.acetabular_offset_mm));
  ck_assert (isnan (m.operated.femoral_offset_mm));
  ck_assert (isnan (m.operated.global_offset_mm));
  ck_assert (isnan (m.operated.hip_centre_height_mm));
  ck_assert (isnan (m.operated.leg_length_mm));
  ck_assert (isnan (m.other.global_offset_mm));
  ck_assert (isnan (m.leg_length_difference_mm));
  ck_assert (isnan (m.global_offset_difference_mm));
  ck_assert (!m.side_contradiction);
}
END_TEST

/* ---- Circle through three points -------------------------------------- */

typedef struct {
  const char *name;
  HlVec2 a, b, c;
  HlVec2 centre;
  double radius;
} CircleCase;

/* (0, 0), (4, 0), (0, 3): the right angle at the origin puts the centre at
 * the middle of the hypotenuse, (2, 1.5), radius 2.5.  The others lie on
 * circles of known centre and radius at angles 10, 135 and 260 deg (and
 * 0, 90, 180): a point is centre + r (cos, sin). */
static const CircleCase circle_cases[] = {
  { "right triangle", { 0, 0 }, { 4, 0 }, { 0, 3 }, { 2, 1.5 }, 2.5 },
  { "unit circle", { 1, 0 }, { 0, 1 }, { -1, 0 }, { 0, 0 }, 1.0 },
  { "marker-sized",
    { 12.5 + 14.3 * 0.984807753012208, -7.25 + 14.3 * 0.173648177666930 },
    { 12.5 - 14.3 * 0.707106781186548, -7.25 + 14.3 * 0.707106781186548 },
    { 12.5 - 14.3 * 0.173648177666930, -7.25 - 14.3 * 0.984807753012208 },
    { 12.5, -7.25 }, 14.3 },
  { "far from the origin", { 1530, -870 }, { 1500, -840 }, { 1470, -870 },
    { 1500, -870 }, 30.0 },
};

START_TEST (test_circle)
{
  const CircleCase *c = &circle_cases[_i];
  HlVec2 centre;
  double radius;
  HlError err = { 0 };

  ck_assert_int_eq (hl_circle_through (c->a, c->b, c->c, &centre, &radius, &err), HL_OK);
  ck_assert_double_eq_tol (centre.x, c->centre.x, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (centre.y, c->centre.y, HL_TEST_TOL_MM);
  ck_assert_double_eq_tol (radius, c->radius, HL_TEST_TOL_MM);
  /* the order of the points does not matter */
  ck_assert_int_eq (hl_circle_through (c->c, c->a, c->b, &centre, &radius, &err), HL_OK);
  ck_assert_double_eq_tol (radius, c->radius, HL_TEST_TOL_MM);
}
END_TEST

typedef struct {
  const char *name;
  HlVec2 a, b, c;
} BadCircleCase;

static const BadCircleCase bad_circle_cases[] = {
  { "collinear", { 0, 0 }, { 1, 1 }, { 2, 2 } },
  { "collinear, far apart", { -40, 12 }, { 10, 12 }, { 85.5, 12 } },
  { "two points the same", { 3, 4 }, { 3, 4 }, { 10, -2 } },
  { "all the same", { 3, 4 }, { 3, 4 }, { 3, 4 } },
  { "nearly collinear", { 0, 0 }, { 50, 1e-10 }, { 100, 0 } },
  { "not a number", { 0, 0 }, { NAN, 1 }, { 2, 0 } },
};

START_TEST (test_circle_refused)
{
  const BadCircleCase *c = &bad_circle_cases[_i];
  HlVec2 centre;
  double radius;
  HlError err = { 0 };
  HlStatus st = hl_circle_through (c->a, c->b, c->c, &centre, &radius, &err);

  ck_assert_msg (st != HL_OK, "%s accepted: radius %g", c->name, radius);
  ck_assert_int_eq (err.status, st);
  ck_assert_uint_gt (strlen (err.message), 0);
}
END_TEST

/* ---- Magnification ---------------------------------------------------- */

/* M = measured / true.  A 25 mm sphere (common practice) whose image has
 * radius 14.85 mm: M = 29.7 / 25 = 1.188.  Two points (10, 20) and
 * (130, 70) are sqrt(120^2 + 50^2) = 130 mm apart on the film; 108.5 mm
 * apart in truth: M = 1.198157.  Without calibration M = 1.20, flagged as
 * assumed: Brew et al. 2012, J Arthroplasty 27:643-647 (mean 119.8%). */
typedef struct {
  const char *name;
  HlCalibration cal;
  double m;
  bool assumed;
} MagCase;

#define MARKER_AT(cx, cy, r)                                               \
  { { (cx) + (r), (cy) },                                                  \
    { (cx) - (r) * 0.5, (cy) + (r) * 0.866025403784439 },                  \
    { (cx) - (r) * 0.5, (cy) - (r) * 0.866025403784439 } }

static const MagCase mag_cases[] = {
  { "assumed", { HL_CAL_ASSUMED, 0, 0, 0, { { 0 } }, 0 }, 1.20, true },
  { "typed", { HL_CAL_TYPED, 1.15, 0, 0, { { 0 } }, 0 }, 1.15, false },
  { "25 mm marker", { HL_CAL_MARKER, 0, 25.0, 0, MARKER_AT (143.2, -87.6, 14.85), 3 },
    1.188, false },
  { "30 mm marker", { HL_CAL_MARKER, 0, 30.0, 0, MARKER_AT (-20.0, 310.5, 17.4), 3 },
    1.16, false },
  { "two points", { HL_CAL_TWO_POINT, 0, 0, 108.5, { { 10, 20 }, { 130, 70 } }, 2 },
    130.0 / 108.5, false },
};

START_TEST (test_magnification)
{
  const MagCase *c = &mag_cases[_i];
  double m = NAN;
  bool assumed = !c->assumed;
  HlError err = { 0 };

  ck_assert_int_eq (hl_calibration_magnification (&c->cal, &m, &assumed, &err), HL_OK);
  ck_assert_double_eq_tol (m, c->m, HL_TEST_TOL_BW);
  ck_assert_int_eq (assumed, c->assumed);
}
END_TEST

START_TEST (test_magnification_defaults)
{
  HlPlan *plan = hl_plan_new ();
  double m = NAN;
  bool assumed = false;

  /* Brew et al. 2012, J Arthroplasty 27:643-647: mean 119.8%, range
   * 117-123.4% */
  ck_assert_double_eq_tol (HL_MAGNIFICATION_ASSUMED, 1.20, TOL_MAGNIFICATION);
  ck_assert (HL_MAGNIFICATION_ASSUMED >= 1.17 && HL_MAGNIFICATION_ASSUMED <= 1.234);
  /* a 25 mm sphere: common practice */
  ck_assert_double_eq_tol (HL_MARKER_DIAMETER_DEFAULT, 25.0, TOL_MAGNIFICATION);
  ck_assert_int_eq (plan->calibration.method, HL_CAL_ASSUMED);
  ck_assert_int_eq (hl_calibration_magnification (&plan->calibration, &m, &assumed, NULL),
                    HL_OK);
  ck_assert_double_eq_tol (m, HL_MAGNIFICATION_ASSUMED, TOL_MAGNIFICATION);
  ck_assert (assumed);
  hl_plan_free (plan);
}
END_TEST

static const MagCase bad_mag_cases[] = {
  { "typed too small", { HL_CAL_TYPED, 0.5, 0, 0, { { 0 } }, 0 }, 0, false },
  { "typed too large", { HL_CAL_TYPED, 1.7, 0, 0, { { 0 } }, 0 }, 0, false },
  { "typed NaN", { HL_CAL_TYPED, NAN, 0, 0, { { 0 } }, 0 }, 0, false },
  { "marker, two points only", { HL_CAL_MARKER, 0, 25.0, 0, MARKER_AT (0, 0, 15), 2 }, 0, false },
  { "marker, collinear points",
    { HL_CAL_MARKER, 0, 25.0, 0, { { 0, 0 }, { 15, 0 }, { 30, 0 } }, 3 }, 0, false },
  { "marker, no size", { HL_CAL_MARKER, 0, 0.0, 0, MARKER_AT (0, 0, 15), 3 }, 0, false },
  { "marker, negative size", { HL_CAL_MARKER, 0, -25.0, 0, MARKER_AT (0, 0, 15), 3 }, 0, false },
  { "marker giving M = 2.4", { HL_CAL_MARKER, 0, 25.0, 0, MARKER_AT (0, 0, 30), 3 }, 0, false },
  { "two points, one given", { HL_CAL_TWO_POINT, 0, 0, 100.0, { { 10, 20 } }, 1 }, 0, false },
  { "two points, no distance",
    { HL_CAL_TWO_POINT, 0, 0, 0.0, { { 10, 20 }, { 130, 70 } }, 2 }, 0, false },
  { "two points the same",
    { HL_CAL_TWO_POINT, 0, 0, 100.0, { { 10, 20 }, { 10, 20 } }, 2 }, 0, false },
  { "two points, NaN",
    { HL_CAL_TWO_POINT, 0, 0, 100.0, { { 10, NAN }, { 130, 70 } }, 2 }, 0, false },
};

START_TEST (test_magnification_refused)
{
  const MagCase *c = &bad_mag_cases[_i];
  double m = NAN;
  bool assumed = false;
  HlError err = { 0 };
  HlStatus st = hl_calibration_magnification (&c->cal, &m, &assumed, &err);

  ck_assert_msg (st != HL_OK, "%s accepted: M = %g", c->name, m);
  ck_assert_int_eq (err.status, st);
  ck_assert_uint_gt (strlen (err.message), 0);
}
END_TEST

/* ---- Against the other hip, in words ---------------------------------- */

/* diff = operated - other (mm): the sign says shorter or longer, less or
 * more; within HL_MEASURE_EQUAL_MM (0.5, common practice) equal; NaN not
 * measured. */
typedef struct {
  double diff_mm;
  const char *leg, *offset, *leg_short, *offset_short;
} WordsCase;

static const WordsCase words_cases[] = {
  { -4.0, "operated leg 4.0 mm shorter than the other",
    "global offset 4.0 mm less than the other side", "4.0 mm shorter", "4.0 mm less" },
  { 2.75, "operated leg 2.8 mm longer than the other",
    "global offset 2.8 mm more than the other side", "2.8 mm longer", "2.8 mm more" },
  { -0.49, "operated leg as long as the other", "global offset the same as the other side",
    "equal", "equal" },
  { 0.5, "operated leg 0.5 mm longer than the other",
    "global offset 0.5 mm more than the other side", "0.5 mm longer", "0.5 mm more" },
  { NAN, "leg length against the other side not measured", "global offset against the "
    "other side not measured", "not measured", "not measured" },
};

START_TEST (test_against_words)
{
  const WordsCase *c = &words_cases[_i];
  char buf[256];
  ck_assert_msg (strncmp (hl_measure_leg_length_words (c->diff_mm, buf, sizeof buf), c->leg,
                          strlen (c->leg)) == 0, "%g: %s", c->diff_mm, buf);
  ck_assert_msg (strncmp (hl_measure_global_offset_words (c->diff_mm, buf, sizeof buf),
                          c->offset, strlen (c->offset)) == 0, "%g: %s", c->diff_mm, buf);
  ck_assert_str_eq (hl_measure_leg_length_short (c->diff_mm, buf, sizeof buf), c->leg_short);
  ck_assert_str_eq (hl_measure_global_offset_short (c->diff_mm, buf, sizeof buf),
                    c->offset_short);
}
END_TEST

static Suite *
measure_suite (void)
{
  Suite *s = suite_create ("measure");
  TCase *tc;

#define ADD_TABLE(name, fn, table)                                         \
  tc = tcase_create (name);                                                \
  tcase_add_loop_test (tc, fn, 0, (int) N_ELEMENTS (table));               \
  suite_add_tcase (s, tc)
#define ADD_LOOP(name, fn, n)                                              \
  tc = tcase_create (name);                                                \
  tcase_add_loop_test (tc, fn, 0, n);                                      \
  suite_add_tcase (s, tc)

  ADD_TABLE ("measures", test_measures, measure_cases);
  ADD_LOOP ("side-contradiction", test_side_contradiction, 2);
  ADD_TABLE ("missing", test_missing, missing_cases);
  ADD_TABLE ("one-teardrop", test_one_teardrop, one_teardrop_cases);
  ADD_LOOP ("nothing-placed", test_nothing_placed, 2);
  ADD_TABLE ("circle", test_circle, circle_cases);
  ADD_TABLE ("circle-refused", test_circle_refused, bad_circle_cases);
  ADD_TABLE ("magnification", test_magnification, mag_cases);
  ADD_LOOP ("magnification-defaults", test_magnification_defaults, 1);
  ADD_TABLE ("magnification-refused", test_magnification_refused, bad_mag_cases);
  ADD_TABLE ("against-words", test_against_words, words_cases);

#undef ADD_LOOP
#undef ADD_TABLE
  return s;
}

int
main (void)
{
  return hl_test_run (measure_suite ());
}

/* hl-test-util.h: helpers shared by the core's Check tests.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <check.h>
#include <math.h>
#include <stdbool.h>

#include "hl-plan.h"
#include "hl-solve.h"

/* Where the operated hip centre sits in the plan frame of the test cases.
 * Any point must do, so it is deliberately not the origin. */
#define HL_TEST_HIP_X (-103.7)
#define HL_TEST_HIP_Y 18.4

/* Expected values in the tables are written with six decimals. */
#define HL_TEST_TOL_MM  1e-5
#define HL_TEST_TOL_N   1e-4
#define HL_TEST_TOL_NMM 1e-2
#define HL_TEST_TOL_BW  1e-6
#define HL_TEST_TOL_DEG 1e-5
/* Two computations of the same quantity by different paths (mirroring,
 * unit conversion): only rounding may differ. */
#define HL_TEST_TOL_REL 1e-9

/* The base geometry of the unit tests, solver frame (x_lat lateral, y
 * superior, origin at the hip centre), invented within the proportions of
 * model.md section 2. */
#define HL_TEST_MIDLINE_X   (-95.0)
#define HL_TEST_MIDLINE_Y   (-12.0)
#define HL_TEST_ORIGIN_X     25.0
#define HL_TEST_ORIGIN_Y     85.0
#define HL_TEST_INSERTION_X  60.0
#define HL_TEST_INSERTION_Y (-10.0)
#define HL_TEST_MASS_KG      72.5

/* Fixed locale and time zone, whatever the caller's environment. */
void hl_test_fix_environment (void);

/* -1 for a right hip, +1 for a left hip: plan x of a lateral step. */
double hl_test_side_sign (HlSide side);

/* A plan with the defaults of hl_plan_new(), the given side and mass, no
 * cane, no loads, and the hip centre at (HL_TEST_HIP_X, HL_TEST_HIP_Y)
 * mirrored for a left hip.  Aborts the test when out of memory. */
HlPlan *hl_test_plan_new (HlSide side, double mass_kg);

/* Places a landmark from solver-frame coordinates relative to the plan's
 * (already placed) hip centre. */
void hl_test_place (HlPlan *plan, HlLandmarkId id, double x_lat, double y);

/* The base plan: hl_test_plan_new plus the base geometry above. */
HlPlan *hl_test_base_plan (HlSide side);

/* Prepares and solves `recon` (NULL = native); fails the test with the
 * core's message when either step fails. */
void hl_test_solve (const HlPlan *plan, const HlRecon *recon, HlResult *res);

/* True when `needle` occurs in `hay`, ignoring ASCII case. */
bool hl_test_contains_ci (const char *hay, const char *needle);

/* The number of line ends ('\n') in s. */
size_t hl_test_count_lines (const char *s);

/* True when the error's field or message names the landmark, by its key
 * or its label. */
bool hl_test_error_names_landmark (const HlError *err, HlLandmarkId id);

/* True when the error's field or message contains `word`. */
bool hl_test_error_mentions (const HlError *err, const char *word);

/* Checks |a - b| <= rel * max(|a|, |b|, scale). */
#define hl_ck_rel(a, b, rel, scale)                                        \
  do {                                                                     \
    double hl_ck_a_ = (a), hl_ck_b_ = (b);                                 \
    double hl_ck_s_ = fmax (fmax (fabs (hl_ck_a_), fabs (hl_ck_b_)), (scale)); \
    ck_assert_msg (fabs (hl_ck_a_ - hl_ck_b_) <= (rel) * hl_ck_s_,         \
                   "%s = %.12g, %s = %.12g: relative difference over %g",  \
                   #a, hl_ck_a_, #b, hl_ck_b_, (double) (rel));            \
  } while (0)

/* Runs a suite with a fixed environment; returns the process exit code. */
int hl_test_run (Suite *suite);

/* hl-batch.h: many what-ifs of one prepared model at once.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The same arithmetic as hl_model_solve(), laid out as a structure of
 * arrays so that the compiler can run several what-ifs per instruction:
 * one array per input (the reconstruction and, optionally, the aids and
 * loads), one per output.  A what-if that hl_model_solve() would refuse
 * gives NaN in every output; hl_model_solve() on that one what-if says why.
 */
#pragma once

#include <stddef.h>

#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

/* n values each.  The six reconstruction arrays are required; a force
 * array that is NULL takes the model's value for every what-if. */
typedef struct {
  const double *cup_medial_mm;
  const double *cup_superior_mm;
  const double *femoral_offset_mm;
  const double *femoral_length_mm;
  const double *head_length_mm;
  const double *neck_shaft_angle_deg;
  const double *cane_n;              /* upwards at the hand, N */
  const double *load_n[2];           /* indexed by HlHand, N */
  const double *load_midline_n;
} HlBatchInput;

/* n values each, every array required; the fields of HlResult of the same
 * name, and the joint force angle of hl_result_jrf_angle_deg(). */
typedef struct {
  double *abductor_arm_mm;
  double *lever_ratio;
  double *abductor_force_n;
  double *jrf_x_n;
  double *jrf_y_n;
  double *jrf_n;
  double *jrf_angle_deg;
} HlBatchOutput;

/* Solves n what-ifs of `model`; returns how many were refused (NaN rows).
 * The input and output arrays must not overlap. */
size_t hl_model_solve_batch (const HlModel *model, const HlBatchInput *in,
                             const HlBatchOutput *out, size_t n);

#ifdef __cplusplus
}
#endif

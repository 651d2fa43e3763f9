/* hl-sweep.h: one parameter over a range, for native and every option.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A sweep sets one parameter to n_steps evenly spaced values from `from`
 * to `to` (both ends included, exactly) and solves native and every
 * option at each value.  The prepared model is perturbed directly, so a
 * step costs one solve per row and nothing is allocated.
 *
 * Option parameters (cup_medial_mm ... neck_shaft_angle_deg) either
 * replace that parameter of every option in turn (HL_SWEEP_MODE_SET, the
 * default) or are added to each option's own setting (HL_SWEEP_MODE_ADD);
 * the native row does not depend on them and repeats the native result as
 * the reference line.  The other
 * parameters (aids, loads, posture, mass, line angle) apply to native and
 * every option alike and replace the plan's value:
 *
 *  - cane_force_n, cane_percent_bw: the cane in the plan's cane hand at the
 *    plan's cane distance (also when the plan's cane is switched off);
 *  - load_contra_kg, load_ipsi_kg, load_midline_kg: a mass at the plan's
 *    distance for that hand;
 *  - lean_mm: lateral trunk lean towards the stance side;
 *  - mass_kg: body mass (weight, capacity and a cane given in %BW scale
 *    with it; loads in kg do not);
 *  - abductor_angle_deg: only when the abductor line is set by angle.
 *
 * Results are row-major: results[row * n_steps + step], row 0 native,
 * row 1 + i option i.
 */
#pragma once

#include <stdbool.h>
#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  HL_SWEEP_CUP_MEDIAL = 0,
  HL_SWEEP_CUP_SUPERIOR,
  HL_SWEEP_FEMORAL_OFFSET,
  HL_SWEEP_FEMORAL_LENGTH,
  HL_SWEEP_HEAD_LENGTH,
  HL_SWEEP_NECK_SHAFT_ANGLE,
  HL_SWEEP_CANE_FORCE_N,
  HL_SWEEP_CANE_PERCENT_BW,
  HL_SWEEP_LOAD_CONTRA_KG,
  HL_SWEEP_LOAD_IPSI_KG,
  HL_SWEEP_LOAD_MIDLINE_KG,
  HL_SWEEP_LEAN_MM,
  HL_SWEEP_MASS_KG,
  HL_SWEEP_ABDUCTOR_ANGLE_DEG,
  HL_SWEEP_N
} HlSweepParam;

typedef struct {
  HlSweepParam param;
  const char *key;        /* stable CLI name: "femoral_offset_mm" */
  const char *label;      /* N_()-marked plain words */
  const char *unit;       /* "mm", "deg", "N", "%BW", "kg" */
  bool per_option;        /* a reconstruction parameter */
  double min;             /* the range the plan accepts */
  double max;             /* (cane_force_n: up to body weight, see below) */
  double default_from;    /* a useful chart range */
  double default_to;
} HlSweepParamInfo;

const HlSweepParamInfo *hl_sweep_param_info (HlSweepParam param);
/* HL_SWEEP_N when `key` names no sweepable parameter. */
HlSweepParam hl_sweep_param_from_key (const char *key);

/* Points in a chart sweep by default. */
#define HL_SWEEP_STEPS_DEFAULT 200
#define HL_SWEEP_STEPS_MAX 100000
/* Rows of a sweep (values x (native + options)): more are refused. */
#define HL_SWEEP_ROWS_MAX 100000

/* How a reconstruction parameter's sweep value meets each option's own
 * setting; the other parameters always replace the plan's value. */
typedef enum {
  HL_SWEEP_MODE_SET = 0,   /* the value replaces each option's setting */
  HL_SWEEP_MODE_ADD,       /* the value is added to each option's setting */
} HlSweepMode;

typedef struct {
  HlSweepParam param;
  double from;
  double to;
  size_t n_steps;      /* >= 2 */
  HlSweepMode mode;    /* HL_SWEEP_MODE_SET when left zero */
} HlSweepSpec;

/* The value of step i (0 .. n_steps - 1); the last step is `to` exactly. */
double hl_sweep_value (const HlSweepSpec *spec, size_t step);

/* The plan a sweep point stands for: `plan` as it would be entered with
 * `param` at `value` (every option's parameter, or the plan's aid, load,
 * lean, mass or abductor angle).  hl_sweep_run gets the same results
 * without preparing the model again; the tests compare the two. */
void hl_sweep_plan_set (HlPlan *plan, HlSweepParam param, double value);

/* Runs the sweep.  `model` is prepared from `plan`; `results` holds
 * results_len >= (1 + plan->n_options) * n_steps entries; `values`
 * (n_steps entries) and `status` (as many as results) may be NULL.
 * A point that cannot be solved gets NaN results and its status; the
 * sweep goes on, and the first such failure is returned with err saying
 * which row and value. */
HlStatus hl_sweep_run (const HlPlan *plan, const HlModel *model,
                       const HlSweepSpec *spec, double *values,
                       HlResult *results, HlStatus *status,
                       size_t results_len, HlError *err);

/* The same for steps first .. first + count - 1 of the sweep only, so that
 * a long sweep is computed and written a block at a time: results holds
 * (1 + plan->n_options) * count entries, row-major with stride count;
 * values (count entries) gets the values of those steps.  A sweep of more
 * than HL_SWEEP_ROWS_MAX rows is refused either way. */
HlStatus hl_sweep_run_steps (const HlPlan *plan, const HlModel *model,
                             const HlSweepSpec *spec, size_t first, size_t count,
                             double *values, HlResult *results, HlStatus *status,
                             size_t results_len, HlError *err);

#ifdef __cplusplus
}
#endif

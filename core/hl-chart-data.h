/* hl-chart-data.h: the numbers of the charts of joint load and abductor
 * force, computed by the core and handed to render/hl-chart.c to draw.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Four charts, each against one thing a surgeon can change: the femoral
 * offset change of each option, the cane force, and the load carried in
 * either hand.  Each has one curve per option plus the native hip, the
 * plan's current setting, and optionally the Monte Carlo 5-95% band of
 * every curve: hl_chart_data_new runs hl_sweep_run for the curves,
 * hl_model_solve for the current settings and hl_mc_run for the bands.
 */
#pragma once

#include <stdbool.h>

#include "hl-plan.h"
#include "hl-solve.h"
#include "hl-sweep.h"
#include "hl-uncertainty.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  HL_CHART_FEMORAL_OFFSET = 0,  /* x: each option's femoral offset change, mm */
  HL_CHART_CANE_FORCE,          /* x: cane force in the plan's cane hand, N */
  HL_CHART_LOAD_CONTRA,         /* x: mass in the hand opposite the operated hip, kg */
  HL_CHART_LOAD_IPSI,           /* x: mass in the hand on the operated side, kg */
  HL_CHART_N
} HlChartKind;

typedef enum {
  HL_CHART_JRF = 0,             /* joint reaction force, x body weight */
  HL_CHART_ABDUCTOR,            /* abductor force, x body weight */
  HL_CHART_QUANTITY_N
} HlChartQuantity;

/* Points per curve, and points (and samples at each) of a band: the bands
 * are smooth, so a coarser grid and fewer samples than a full run do. */
#define HL_CHART_STEPS_DEFAULT 121
#define HL_CHART_BAND_STEPS_DEFAULT 11
#define HL_CHART_BAND_SAMPLES_DEFAULT 1000
#define HL_CHART_BAND_STEPS_MAX 201

typedef struct {
  HlChartKind kind;
  HlSweepSpec spec;          /* the curves' parameter and range */
  size_t n_rows;             /* 1 + options; row 0 is native */
  char (*names)[HL_NAME_MAX];

  double *x;                 /* spec.n_steps values */
  HlResult *results;         /* results[row * n_steps + step] */
  HlStatus *status;          /* the same layout; HL_OK where solved */

  /* The plan's current setting of each row: false for native on the
   * femoral offset chart (native has no option parameter). */
  bool *current_valid;
  double *current_x;
  HlResult *current;

  /* Monte Carlo bands: n_band_steps points per row, NULL without bands. */
  size_t n_band_steps;
  double *band_x;
  HlMcSummary *bands;        /* bands[row * n_band_steps + j] */
  bool *band_valid;
  HlMcInfo band_info;        /* the seed and the samples used at the last point */
  size_t band_samples;
} HlChartData;

/* Runs the core for one chart of `plan`: n_steps (>= 2) points per curve
 * over a range that covers the defaults of hl-sweep.h and the plan's own
 * settings; with `mc` non-NULL, bands at n_band_steps points from
 * mc->n_samples samples each (mc->magnification as given).  NULL with err
 * set when the plan cannot be solved or memory runs out. */
HlChartData *hl_chart_data_new (const HlPlan *plan, HlChartKind kind,
                                size_t n_steps, size_t n_band_steps,
                                const HlMcSettings *mc, HlError *err);
void hl_chart_data_free (HlChartData *data);

/* Plain words: the chart's title, its x axis and its y axis with the units
 * (xBW: multiples of body weight). */
const char *hl_chart_kind_title (HlChartKind kind);
const char *hl_chart_kind_axis (HlChartKind kind);
const char *hl_chart_quantity_axis (HlChartQuantity quantity);

/* The y value drawn for a result. */
double hl_chart_value (const HlResult *res, HlChartQuantity quantity);

/* A band's edge for a quantity: which < 0 the 5th percentile, > 0 the
 * 95th, 0 the median. */
double hl_chart_band_value (const HlMcSummary *s, HlChartQuantity quantity,
                            int which);

/* A copy of `plan` with the chart's parameter at x, as the chart means it
 * (every option's femoral offset, the cane force in N, a hand's load);
 * NULL when out of memory.  Free with hl_plan_free. */
HlPlan *hl_chart_plan_at (const HlPlan *plan, HlChartKind kind, double x);

/* The y range drawn for a quantity (curves, marks and, when shown, bands),
 * padded; false when nothing could be solved. */
bool hl_chart_y_range (const HlChartData *data, HlChartQuantity quantity,
                       bool with_bands, double *lo, double *hi);

/* ---- CSV -------------------------------------------------------------- */

/* The header line of a sweep table (without the newline): the columns of
 * `hiplever-cli solve --format csv` after "param,value,option". */
#define HL_SWEEP_CSV_HEADER \
  "param,value,option,abductor_arm_mm,bw_arm_mm,lever_ratio," \
  "abductor_force_N,abductor_force_BW,jrf_N,jrf_BW,jrf_angle_deg," \
  "global_offset_change_mm,leg_length_change_mm,abductor_length_change_mm,flags"

/* A sweep (hl_sweep_run's values, results and status, rows as there) as
 * CSV in the C locale: the header, then for each value native and every
 * option, numbers at solve's precision; a point that could not be solved
 * has "nan" numbers and the flag "not-solved".  `status` may be NULL.
 * *out is malloc'd and NUL-terminated. */
HlStatus hl_sweep_to_csv (const HlPlan *plan, const HlSweepSpec *spec,
                          const double *values, const HlResult *results,
                          const HlStatus *status, char **out, size_t *size,
                          HlError *err);

/* A chart's curves as the same CSV. */
HlStatus hl_chart_data_to_csv (const HlChartData *data, const HlPlan *plan,
                               char **out, size_t *size, HlError *err);

#ifdef __cplusplus
}
#endif

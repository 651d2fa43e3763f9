/* hl-fit.h: ranking the implant combinations of a templated option.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * For a templated option, every liner x stem version x head length of the
 * catalogue with the cup and stem as placed (and with HL_FIT_SIZES also
 * every cup size of the family at the same centre and every stem size of
 * the family at the same seat) is derived (hl-template.h) and solved
 * (hl_model_solve), and the combinations are ranked by
 *
 *    |leg length residual| + |global offset residual|   (mm, ascending)
 *
 * ties (within HL_FIT_TIE_MM) by the lower joint force.  The residuals are
 * against the other hip where both hips' radiographic measures exist
 * (hl-measure.h): leg length residual = native leg length difference
 * (operated - other) + leg length change; global offset residual = native
 * global offset + change - the other hip's global offset; else against
 * native: the changes themselves.  `jrf_p95_bw` is the 95th percentile of
 * the joint force over the plan's Monte Carlo settings (hl-uncertainty.h;
 * the template geometry itself is not perturbed, as the teardrops are
 * not).  The command line's `fit` and the window show the same table.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include "hl-catalogue.h"
#include "hl-plan.h"
#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Scores closer than this count as equal (then the lower joint force
 * ranks first): a tolerance of ours, far below anything a radiograph
 * resolves. */
#define HL_FIT_TIE_MM 1e-9

typedef enum {
  HL_FIT_SIZES = 1u << 0,   /* also every cup and stem size */
  HL_FIT_NO_MC = 1u << 1,   /* skip the Monte Carlo (jrf_p95_bw NaN) */
} HlFitFlags;

typedef struct {
  size_t rank;                       /* 1-based */
  HlTemplate tmpl;                   /* the combination, resolved */
  /* The combination's cup diameter, liner, stem size, version and head
   * length are tmpl.cup_diameter_mm, tmpl.liner, tmpl.stem_size,
   * tmpl.version and tmpl.head_length_mm. */
  HlRecon recon;                     /* derived four numbers (tmpl.on) */
  HlResult result;                   /* solved */
  double leg_length_residual_mm;
  double global_offset_residual_mm;
  double score_mm;                   /* |ll residual| + |go residual| */
  double jrf_p95_bw;                 /* NaN with HL_FIT_NO_MC */
} HlFitRow;

typedef struct {
  HlFitRow *rows;                    /* ranked; rows[i].rank == i + 1 */
  size_t n;
  size_t option;                     /* the option ranked */
  bool against_other_hip;            /* residuals against the other hip */
  size_t mc_samples_used;            /* 0 with HL_FIT_NO_MC */
} HlFitTable;

/* The first templated option, or -1. */
long hl_fit_first_templated (const HlPlan *plan);

/* Ranks the combinations of option `option` (templated) from cat.  On
 * failure out is empty.  err names the option or the landmark at fault. */
HlStatus hl_fit_rank (const HlPlan *plan, size_t option,
                      const HlCatalogue *cat, unsigned flags,
                      HlFitTable *out, HlError *err);
void hl_fit_table_clear (HlFitTable *table);

/* Puts row's combination into option `option` of plan
 * (hl_plan_set_template). */
HlStatus hl_fit_apply (HlPlan *plan, size_t option, const HlFitRow *row,
                       const HlCatalogue *cat, HlError *err);

#ifdef __cplusplus
}
#endif

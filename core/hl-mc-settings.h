/* hl-mc-settings.h: the Monte Carlo settings, recorded in every plan.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A header of its own so that hl-plan.h can hold the settings without
 * including hl-uncertainty.h (which includes hl-solve.h, which includes
 * hl-plan.h).
 */
#pragma once

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  uint64_t seed;
  size_t n_samples;
  double landmark_sd_mm;
  double magnification_sd;
  double magnification;       /* M in use for the plan (HL_MAGNIFICATION_ASSUMED
                               * without calibration); not stored in a plan
                               * file: filled from the calibration when run */
  double line_angle_sd_deg;
} HlMcSettings;

/* The most samples a plan file may record: a sanity limit of ours that keeps
 * a planning summary's run well under a second (the command line may ask
 * for up to HL_MC_SAMPLES_MAX). */
#define HL_MC_PLAN_SAMPLES_MAX 200000

/* The recorded default seed: any fixed number does; this one is ours. */
#define HL_MC_SEED_DEFAULT UINT64_C (20260417)
#define HL_MC_SAMPLES_DEFAULT 4000
#define HL_MC_SAMPLES_MAX 10000000
/* Samples times rows (native and the options) of one `uncertainty` run
 * of the command line: each sample row keeps two doubles, so a run holds
 * at most 320 MB (64 options and 10 million samples would have needed
 * 10 GB).  A plan's own setting (HL_MC_PLAN_SAMPLES_MAX) stays below it. */
#define HL_MC_SAMPLE_ROWS_MAX 20000000
/* Landmark placement error, SD of each coordinate: model.md section 7,
 * an assumption for careful placement on a calibrated AP pelvis. */
#define HL_MC_LANDMARK_SD_MM_DEFAULT 2.0
/* Magnification error, SD of M: an estimate.  AP pelvis magnification
 * ranged 117-123.4% (mean 119.8%) in Brew et al. 2012, J Arthroplasty
 * 27:643-647; a range of 6.4 points over a modest series is about 3 to 4
 * SD, so SD 0.016-0.021; we take 0.02. */
#define HL_MC_MAGNIFICATION_SD_DEFAULT 0.02
/* Abductor line angle error, SD: an assumption of ours (the resultant
 * line of a fan-shaped muscle group is not well defined on a radiograph). */
#define HL_MC_LINE_ANGLE_SD_DEG_DEFAULT 5.0
/* Upper limits that catch typing errors. */
#define HL_MC_LANDMARK_SD_MM_MAX 20.0
#define HL_MC_MAGNIFICATION_SD_MAX 0.2
#define HL_MC_LINE_ANGLE_SD_DEG_MAX 30.0

/* The defaults above, M = HL_MAGNIFICATION_ASSUMED. */
void hl_mc_settings_init (HlMcSettings *settings);

#ifdef __cplusplus
}
#endif

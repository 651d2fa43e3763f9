/* hl-mc-settings.h: the Monte Carlo settings, recorded in every plan.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A header of its own so that hl-plan.h can hold the settings without
 * including hl-uncertainty.h (which includes hl-solve.h, which includes
 * hl-plan.h).  Defaults, limits and their sources are in hl-uncertainty.h.
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

#ifdef __cplusplus
}
#endif

/* hl-mc-settings.c: the Monte Carlo settings' defaults.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-mc-settings.h"
#include "hl-types.h"

void
hl_mc_settings_init (HlMcSettings *s)
{
  s->seed = HL_MC_SEED_DEFAULT;
  s->n_samples = HL_MC_SAMPLES_DEFAULT;
  s->landmark_sd_mm = HL_MC_LANDMARK_SD_MM_DEFAULT;
  s->magnification_sd = HL_MC_MAGNIFICATION_SD_DEFAULT;
  s->magnification = HL_MAGNIFICATION_ASSUMED;
  s->line_angle_sd_deg = HL_MC_LINE_ANGLE_SD_DEG_DEFAULT;
}

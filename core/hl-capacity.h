/* hl-capacity.h: abductor capacity presets (model.md section 7).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The user enters a maximal abductor torque per kg of body mass
 * (HlPlan.capacity.torque_nm_per_kg).  The core turns it into a force
 * capacity over the NATIVE abductor moment arm,
 *
 *   F_cap = torque * mass / r_a,native,
 *
 * because the torque was measured with the patient's own hip: what the
 * muscle can deliver is a force, and an option that lengthens the arm
 * needs less of it.  Demand for native and every option is
 * F_a(option) / F_cap (equivalently F_a(option) * r_a,native over the
 * torque capacity); above 1 the pelvis cannot be held level in stance (a
 * positive Trendelenburg sign or a compensating lean) and the result
 * carries HL_FLAG_OVER_CAPACITY.  hl_model_prepare and hl_model_solve
 * compute both (HlModel.capacity_force_n, HlResult.demand); this file
 * holds the published anchors for the input.
 *
 * The young-adult figures are an upper anchor: older or arthritic
 * patients sit well below them, so any default is an assumption for the
 * patient at hand and is labelled so.
 */
#pragma once

#include <stdbool.h>
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Isokinetic peak hip abductor torque at 60 deg/s, normalised to body
 * mass: Sugimoto et al. 2014, Clin J Sport Med 24:422-428. */
#define HL_CAPACITY_YOUNG_MEN_NM_PER_KG   1.29
#define HL_CAPACITY_YOUNG_WOMEN_NM_PER_KG 1.13
/* Operated-side abductor strength deficit against the other side:
 * about 18% before surgery and about 6% two years after (Rasch et al.
 * 2010, Acta Orthop 81:183-188). */
#define HL_CAPACITY_DEFICIT_BEFORE_SURGERY 0.18
#define HL_CAPACITY_DEFICIT_TWO_YEARS      0.06
/* The program default: the young women's figure (the lower of the two
 * published anchors), an assumption for any one patient. */
#define HL_CAPACITY_DEFAULT_PRESET HL_CAPACITY_PRESET_YOUNG_WOMEN

typedef enum {
  HL_CAPACITY_PRESET_YOUNG_MEN = 0,
  HL_CAPACITY_PRESET_YOUNG_WOMEN,
  HL_CAPACITY_PRESET_BEFORE_SURGERY,   /* derived: young women x (1 - 0.18) */
  HL_CAPACITY_PRESET_TWO_YEARS_AFTER,  /* derived: young women x (1 - 0.06) */
  HL_CAPACITY_PRESET_N
} HlCapacityPreset;

typedef struct {
  HlCapacityPreset preset;
  const char *key;        /* stable file and CLI name: "young-women" */
  const char *label;      /* N_()-marked plain words */
  double torque_nm_per_kg;
  const char *source;     /* full citation, and how a derived value is made */
  bool derived;           /* computed from a published figure, not read */
} HlCapacityPresetInfo;

const HlCapacityPresetInfo *hl_capacity_preset_info (HlCapacityPreset preset);
/* HL_CAPACITY_PRESET_N when `key` names no preset. */
HlCapacityPreset hl_capacity_preset_from_key (const char *key);

/* The caveat shown beside any preset: the figures are young-adult
 * anchors and an assumption for the patient at hand. */
const char *hl_capacity_assumption_text (void);

#ifdef __cplusplus
}
#endif

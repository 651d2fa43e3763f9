/* hl-measure.h: radiographic measures (model.md s. 8).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * All inputs are plan-frame landmarks in true millimetres.  Each measure is
 * NaN when the landmarks it needs are not placed.
 *
 *  - inter-teardrop line: through both teardrops; with only one teardrop
 *    placed, a level line through it;
 *  - acetabular offset: distance from the hip centre to the perpendicular
 *    to the inter-teardrop line through that side's teardrop;
 *  - femoral offset: perpendicular distance from the hip centre to the
 *    femoral shaft axis (two points);
 *  - global offset: acetabular + femoral offset;
 *  - hip centre height: distance of the hip centre above the
 *    inter-teardrop line;
 *  - leg length: distance from the lesser trochanter tip to the
 *    inter-teardrop line; difference = operated minus other side.
 */
#pragma once

#include "hl-plan.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  double acetabular_offset_mm;
  double femoral_offset_mm;
  double global_offset_mm;
  double hip_centre_height_mm;
  double leg_length_mm;
} HlSideMeasures;

typedef struct {
  HlSideMeasures operated;
  HlSideMeasures other;
  double leg_length_difference_mm;     /* operated - other */
  double global_offset_difference_mm;  /* operated - other */
  double femoral_offset_difference_mm;
  double acetabular_offset_difference_mm;
  double hip_centre_height_difference_mm;
  bool side_contradiction;   /* landmarks suggest the other side is operated */
} HlMeasures;

/* Measures on a set of plan-frame landmarks of a plan of side `side`. */
void hl_measure (const HlLandmarks *lm, HlSide side, HlMeasures *out);

/* Within this the operated side is called equal to the other: half the
 * millimetre to which landmarks are placed (common practice). */
#define HL_MEASURE_EQUAL_MM 0.5

/* The operated side against the other in words, as a surgeon plans by:
 * "operated leg 4.0 mm shorter than the other", "global offset 2.8 mm less
 * than the other side" (diff = operated - other, mm; NaN: not measured).
 * Returns buf. */
char *hl_measure_leg_length_words (double diff_mm, char *buf, size_t size);
char *hl_measure_global_offset_words (double diff_mm, char *buf, size_t size);
/* The same, short, for a table whose row says what: "4.0 mm shorter",
 * "2.8 mm less", "equal", "not measured". */
char *hl_measure_leg_length_short (double diff_mm, char *buf, size_t size);
char *hl_measure_global_offset_short (double diff_mm, char *buf, size_t size);

/* The magnification of a calibration: hl-calibration.h (through hl-plan.h). */

#ifdef __cplusplus
}
#endif

/* hl-calibration.h: calibrations and the magnification they give.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A header of its own so that hl-plan.h can hold a calibration and
 * hl_plan_check() can check its magnification without including
 * hl-measure.h (which includes hl-plan.h).
 */
#pragma once

#include <stdbool.h>
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Two points closer than this are taken as one. */
#define HL_MIN_SEPARATION_MM 0.5

typedef enum {
  HL_CAL_ASSUMED = 0,   /* no calibration: M = HL_MAGNIFICATION_ASSUMED, said so */
  HL_CAL_TYPED,         /* magnification typed by the user */
  HL_CAL_MARKER,        /* a sphere of known diameter: circle through three edge points */
  HL_CAL_TWO_POINT,     /* two points a known distance apart */
} HlCalMethod;

/* HL_MAGNIFICATION_ASSUMED (1.20, Brew et al. 2012) is in hl-types.h. */
/* A 25 mm calibration sphere: common practice. */
#define HL_MARKER_DIAMETER_DEFAULT 25.0
/* Accepted ranges of the true sizes, limits of our own (the window's). */
#define HL_MARKER_DIAMETER_MIN_MM 1.0
#define HL_MARKER_DIAMETER_MAX_MM 100.0
#define HL_KNOWN_DISTANCE_MIN_MM 1.0
#define HL_KNOWN_DISTANCE_MAX_MM 1000.0

typedef struct {
  HlCalMethod method;
  double magnification;        /* HL_CAL_TYPED: the typed factor */
  double marker_diameter_mm;   /* HL_CAL_MARKER: true diameter */
  double known_distance_mm;    /* HL_CAL_TWO_POINT: true distance */
  /* Measured points, in millimetres on the radiograph (image mm, not yet
   * corrected for magnification): three on the marker edge, or the first
   * two for HL_CAL_TWO_POINT. */
  HlVec2 points[3];
  int n_points;
} HlCalibration;

/* Magnification factor M (measured / true) from a calibration.  HL_CAL_ASSUMED
 * gives HL_MAGNIFICATION_ASSUMED and sets *assumed.  Fails on too few or
 * collinear marker points, or a non-positive size. */
HlStatus hl_calibration_magnification (const HlCalibration *cal, double *m,
                                       bool *assumed, HlError *err);

/* True when a marker or two-point calibration has all its points placed
 * (three, or two), so that it gives a magnification of its own. */
bool hl_calibration_complete (const HlCalibration *cal);

/* Allowed difference between the magnification a plan file records for a
 * marker or two-point calibration and the one its points give: the
 * magnification is shown to 3 decimals, so a file that agrees to half of
 * the last shown digit agrees (common practice for rounding). */
#define HL_MAGNIFICATION_AGREE_TOL 0.0005

/* Circle through three points; fails when they are (nearly) collinear. */
HlStatus hl_circle_through (HlVec2 a, HlVec2 b, HlVec2 c, HlVec2 *centre,
                            double *radius, HlError *err);


#ifdef __cplusplus
}
#endif

/* hl-calibration.c: the magnification of a calibration (model.md s. 8).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "hl-calibration.h"
#include "hl-i18n.h"

/* Three marker points closer to a line than this (relative to their
 * spread) define no circle. */
#define HL_COLLINEAR_REL_TOL 1e-6

HlStatus
hl_circle_through (HlVec2 a, HlVec2 b, HlVec2 c, HlVec2 *centre, double *radius,
                   HlError *err)
{
  const double bx = b.x - a.x, by = b.y - a.y;
  const double cx = c.x - a.x, cy = c.y - a.y;
  const double d = 2.0 * (bx * cy - by * cx);
  const double spread = fmax (bx * bx + by * by, cx * cx + cy * cy);

  if (!isfinite (d) || spread <= 0.0 || fabs (d) <= HL_COLLINEAR_REL_TOL * 2.0 * spread)
    return hl_error_set (err, HL_ERR_DEGENERATE, "calibration points",
                         _("The three marker points lie on a line: place them "
                           "spread around the marker's edge"));

  const double b2 = bx * bx + by * by, c2 = cx * cx + cy * cy;
  const double ux = (cy * b2 - by * c2) / d;
  const double uy = (bx * c2 - cx * b2) / d;
  if (centre != NULL)
    *centre = (HlVec2) { a.x + ux, a.y + uy };
  if (radius != NULL)
    *radius = hypot (ux, uy);
  return HL_OK;
}

static HlStatus
check_magnification (double m, HlError *err)
{
  if (!isfinite (m) || m < HL_MAGNIFICATION_MIN || m > HL_MAGNIFICATION_MAX)
    return hl_error_set (err, HL_ERR_INVALID, "calibration magnification",
                         _("The magnification comes out at %.3f: a radiograph "
                           "of the pelvis magnifies between %.2f and %.2f, so "
                           "check the calibration (the marker size, the known "
                           "distance or the points)"),
                         m, HL_MAGNIFICATION_MIN, HL_MAGNIFICATION_MAX);
  return HL_OK;
}

bool
hl_calibration_complete (const HlCalibration *cal)
{
  return (cal->method == HL_CAL_MARKER && cal->n_points >= 3)
         || (cal->method == HL_CAL_TWO_POINT && cal->n_points >= 2);
}

HlStatus
hl_calibration_magnification (const HlCalibration *cal, double *m, bool *assumed,
                              HlError *err)
{
  double value = HL_MAGNIFICATION_ASSUMED;
  bool is_assumed = false;
  HlStatus st;

  for (int i = 0; i < cal->n_points && i < 3; i++)
    if (!isfinite (cal->points[i].x) || !isfinite (cal->points[i].y))
      return hl_error_set (err, HL_ERR_INVALID, "calibration points",
                           _("Calibration point %d is not a finite number"), i + 1);

  switch (cal->method)
    {
    case HL_CAL_ASSUMED:
      is_assumed = true;
      break;
    case HL_CAL_TYPED:
      value = cal->magnification;
      break;
    case HL_CAL_MARKER:
      {
        if (cal->n_points < 3)
          return hl_error_set (err, HL_ERR_INVALID, "calibration points",
                               _("A marker needs three points on its edge; %d placed"),
                               cal->n_points);
        if (!isfinite (cal->marker_diameter_mm) || cal->marker_diameter_mm <= 0.0)
          return hl_error_set (err, HL_ERR_INVALID, "calibration marker-diameter",
                               _("The marker diameter must be a positive number of mm"));
        double r;
        if ((st = hl_circle_through (cal->points[0], cal->points[1], cal->points[2],
                                     NULL, &r, err)))
          return st;
        value = 2.0 * r / cal->marker_diameter_mm;
        break;
      }
    case HL_CAL_TWO_POINT:
      {
        if (cal->n_points < 2)
          return hl_error_set (err, HL_ERR_INVALID, "calibration points",
                               _("Two points a known distance apart are needed; %d placed"),
                               cal->n_points);
        if (!isfinite (cal->known_distance_mm) || cal->known_distance_mm <= 0.0)
          return hl_error_set (err, HL_ERR_INVALID, "calibration known-distance",
                               _("The known distance must be a positive number of mm"));
        double d = hypot (cal->points[1].x - cal->points[0].x,
                          cal->points[1].y - cal->points[0].y);
        if (d < HL_MIN_SEPARATION_MM)
          return hl_error_set (err, HL_ERR_DEGENERATE, "calibration points",
                               _("The two calibration points coincide"));
        value = d / cal->known_distance_mm;
        break;
      }
    default:
      return hl_error_set (err, HL_ERR_INVALID, "calibration method",
                           _("Unknown calibration method"));
    }

  if ((st = check_magnification (value, err)))
    return st;
  if (m != NULL)
    *m = value;
  if (assumed != NULL)
    *assumed = is_assumed;
  return HL_OK;
}

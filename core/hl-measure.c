/* hl-measure.c: radiographic measures (model.md s. 8).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-measure.h"

/* HL_MIN_SEPARATION_MM is in hl-calibration.h. */

static double
dot (HlVec2 a, HlVec2 b)
{
  return a.x * b.x + a.y * b.y;
}

static HlVec2
sub (HlVec2 a, HlVec2 b)
{
  return (HlVec2) { a.x - b.x, a.y - b.y };
}

typedef struct {
  bool ok;
  HlVec2 point;   /* a point on the line */
  HlVec2 e;       /* unit direction from the operated to the other side */
  HlVec2 n;       /* unit normal, pointing up */
} RefLine;

static RefLine
teardrop_line (const HlLandmarks *lm, double side_sign)
{
  RefLine l = { 0 };
  bool a = hl_landmarks_has (lm, HL_LM_TEARDROP);
  bool b = hl_landmarks_has (lm, HL_LM_TEARDROP_OTHER);

  if (!a && !b)
    return l;
  /* The other side lies medially of the operated one: towards -side_sign
   * in plan x. */
  l.e = (HlVec2) { -side_sign, 0.0 };
  l.point = a ? lm->p[HL_LM_TEARDROP] : lm->p[HL_LM_TEARDROP_OTHER];
  if (a && b)
    {
      HlVec2 d = sub (lm->p[HL_LM_TEARDROP_OTHER], lm->p[HL_LM_TEARDROP]);
      double len = hypot (d.x, d.y);
      if (len < HL_MIN_SEPARATION_MM)
        return l;
      l.e = (HlVec2) { d.x / len, d.y / len };
    }
  l.n = (HlVec2) { -l.e.y, l.e.x };
  if (l.n.y < 0.0)
    l.n = (HlVec2) { -l.n.x, -l.n.y };
  l.ok = true;
  return l;
}

static double
shaft_distance (const HlLandmarks *lm, HlLandmarkId centre, HlLandmarkId prox,
                HlLandmarkId dist)
{
  if (!hl_landmarks_has (lm, centre) || !hl_landmarks_has (lm, prox)
      || !hl_landmarks_has (lm, dist))
    return NAN;
  HlVec2 d = sub (lm->p[dist], lm->p[prox]);
  double len = hypot (d.x, d.y);
  if (len < HL_MIN_SEPARATION_MM)
    return NAN;
  HlVec2 r = sub (lm->p[centre], lm->p[prox]);
  return fabs (r.x * d.y - r.y * d.x) / len;
}

static void
measure_side (const HlLandmarks *lm, const RefLine *line, bool other,
              HlSideMeasures *out)
{
  HlLandmarkId hc = other ? HL_LM_HIP_CENTRE_OTHER : HL_LM_HIP_CENTRE;
  HlLandmarkId td = other ? HL_LM_TEARDROP_OTHER : HL_LM_TEARDROP;
  HlLandmarkId lt = other ? HL_LM_LESSER_TROCHANTER_OTHER : HL_LM_LESSER_TROCHANTER;
  /* Lateral for this side, along the teardrop line. */
  HlVec2 lateral = other ? line->e : (HlVec2) { -line->e.x, -line->e.y };

  out->acetabular_offset_mm = NAN;
  out->hip_centre_height_mm = NAN;
  out->leg_length_mm = NAN;
  out->femoral_offset_mm = other
    ? shaft_distance (lm, hc, HL_LM_SHAFT_PROXIMAL_OTHER, HL_LM_SHAFT_DISTAL_OTHER)
    : shaft_distance (lm, hc, HL_LM_SHAFT_PROXIMAL, HL_LM_SHAFT_DISTAL);

  if (line->ok && hl_landmarks_has (lm, hc))
    {
      if (hl_landmarks_has (lm, td))
        out->acetabular_offset_mm = dot (sub (lm->p[hc], lm->p[td]), lateral);
      out->hip_centre_height_mm = dot (sub (lm->p[hc], line->point), line->n);
    }
  if (line->ok && hl_landmarks_has (lm, lt))
    out->leg_length_mm = -dot (sub (lm->p[lt], line->point), line->n);

  out->global_offset_mm = out->acetabular_offset_mm + out->femoral_offset_mm;
}

void
hl_measure (const HlLandmarks *lm, HlSide side, HlMeasures *out)
{
  double s = side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  RefLine line = teardrop_line (lm, s);

  memset (out, 0, sizeof *out);
  measure_side (lm, &line, false, &out->operated);
  measure_side (lm, &line, true, &out->other);

  out->leg_length_difference_mm = out->operated.leg_length_mm - out->other.leg_length_mm;
  out->global_offset_difference_mm = out->operated.global_offset_mm - out->other.global_offset_mm;
  out->femoral_offset_difference_mm = out->operated.femoral_offset_mm - out->other.femoral_offset_mm;
  out->acetabular_offset_difference_mm =
    out->operated.acetabular_offset_mm - out->other.acetabular_offset_mm;
  out->hip_centre_height_difference_mm =
    out->operated.hip_centre_height_mm - out->other.hip_centre_height_mm;

  /* The operated hip must lie on the operated side of the midline, the
   * other hip on the other side. */
  if (hl_landmarks_has (lm, HL_LM_MIDLINE))
    {
      double mx = lm->p[HL_LM_MIDLINE].x;
      if (hl_landmarks_has (lm, HL_LM_HIP_CENTRE) && s * (lm->p[HL_LM_HIP_CENTRE].x - mx) <= 0.0)
        out->side_contradiction = true;
      if (hl_landmarks_has (lm, HL_LM_HIP_CENTRE_OTHER)
          && s * (lm->p[HL_LM_HIP_CENTRE_OTHER].x - mx) >= 0.0)
        out->side_contradiction = true;
    }
}

char *
hl_measure_leg_length_words (double diff_mm, char *buf, size_t size)
{
  if (size == 0)
    return buf;
  if (!isfinite (diff_mm))
    snprintf (buf, size, "%s", _("leg length against the other side not measured: "
                                 "place both teardrops and both lesser trochanters"));
  else if (fabs (diff_mm) < HL_MEASURE_EQUAL_MM)
    snprintf (buf, size, "%s", _("operated leg as long as the other"));
  else if (diff_mm < 0.0)
    snprintf (buf, size, _("operated leg %.1f mm shorter than the other"), -diff_mm);
  else
    snprintf (buf, size, _("operated leg %.1f mm longer than the other"), diff_mm);
  return buf;
}

char *
hl_measure_global_offset_words (double diff_mm, char *buf, size_t size)
{
  if (size == 0)
    return buf;
  if (!isfinite (diff_mm))
    snprintf (buf, size, "%s", _("global offset against the other side not measured: "
                                 "place both teardrops, both femoral shaft axes and the "
                                 "other hip centre"));
  else if (fabs (diff_mm) < HL_MEASURE_EQUAL_MM)
    snprintf (buf, size, "%s", _("global offset the same as the other side"));
  else if (diff_mm < 0.0)
    snprintf (buf, size, _("global offset %.1f mm less than the other side"), -diff_mm);
  else
    snprintf (buf, size, _("global offset %.1f mm more than the other side"), diff_mm);
  return buf;
}

/* kind 0: leg length (shorter, longer); 1: global offset (less, more). */
static char *
difference_short (double diff_mm, int kind, char *buf, size_t size)
{
  if (size == 0)
    return buf;
  double d = fabs (diff_mm);
  if (!isfinite (diff_mm))
    snprintf (buf, size, "%s", _("not measured"));
  else if (d < HL_MEASURE_EQUAL_MM)
    snprintf (buf, size, "%s", _("equal"));
  else if (kind == 0 && diff_mm < 0.0)
    snprintf (buf, size, _("%.1f mm shorter"), d);
  else if (kind == 0)
    snprintf (buf, size, _("%.1f mm longer"), d);
  else if (diff_mm < 0.0)
    snprintf (buf, size, _("%.1f mm less"), d);
  else
    snprintf (buf, size, _("%.1f mm more"), d);
  return buf;
}

char *
hl_measure_leg_length_short (double diff_mm, char *buf, size_t size)
{
  return difference_short (diff_mm, 0, buf, size);
}

char *
hl_measure_global_offset_short (double diff_mm, char *buf, size_t size)
{
  return difference_short (diff_mm, 1, buf, size);
}

/* hl-solve-private.h: pieces of the solve shared by hl-solve.c and
 * hl-batch.c (not installed, not for callers outside the core).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <math.h>

#include "hl-plan.h"

/* sin and cos of whole-degree neck-shaft angles, HL_NECK_SHAFT_MIN_DEG to
 * HL_NECK_SHAFT_MAX_DEG: stems are specified in whole degrees, so what-if
 * loops rarely need the library's trigonometry.  The values are those of
 * sin (a * DEG) and cos (a * DEG), printed to 17 digits. */
#define HL_NECK_TABLE_FIRST 90
#define HL_NECK_TABLE_LAST 170
extern const double hl_neck_sin_cos[HL_NECK_TABLE_LAST - HL_NECK_TABLE_FIRST + 1][2];

/* Effective femoral offset and length changes of the femoral offset and
 * length, head length and neck-shaft angle of a reconstruction; the head
 * length only adds trigonometry when it is non-zero (the common case). */
static inline void
hl_femur_shift (double femoral_offset_mm, double femoral_length_mm,
                double head_length_mm, double neck_shaft_angle_deg,
                double *offset, double *length)
{
  *offset = femoral_offset_mm;
  *length = femoral_length_mm;
  if (head_length_mm != 0.0)
    {
      const double deg = neck_shaft_angle_deg;
      double sa, ca;
      if (deg >= HL_NECK_TABLE_FIRST && deg <= HL_NECK_TABLE_LAST && deg == (int) deg)
        {
          sa = hl_neck_sin_cos[(int) deg - HL_NECK_TABLE_FIRST][0];
          ca = hl_neck_sin_cos[(int) deg - HL_NECK_TABLE_FIRST][1];
        }
      else
        {
          sa = sin (deg * (M_PI / 180.0));
          ca = cos (deg * (M_PI / 180.0));
        }
      *offset += head_length_mm * sa;
      *length -= head_length_mm * ca;
    }
}

static inline void
hl_recon_femur_shift (const HlRecon *r, double *offset, double *length)
{
  hl_femur_shift (r->femoral_offset_mm, r->femoral_length_mm, r->head_length_mm,
                  r->neck_shaft_angle_deg, offset, length);
}

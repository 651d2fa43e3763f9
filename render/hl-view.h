/* hl-view.h: how the plan frame is mapped to a drawing (cairo-free).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Screen coordinates are device-independent units (px at scale 1, cairo
 * user space) with y down.  A view maps the plan frame (mm, x towards the
 * patient's left, y superior) to the screen in the radiographic convention,
 * the patient's right on the viewer's left:
 *
 *     sx = x * scale + tx,     sy = -y * scale + ty
 *
 * Apart from hl-render.h so that the radiograph underlay (hl-underlay.h),
 * which the figures draw under the schematic, needs only the view.
 */
#pragma once

#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Zoom limits of a view, px per mm. */
#define HL_VIEW_SCALE_MIN 0.05
#define HL_VIEW_SCALE_MAX 40.0

typedef struct {
  double scale;   /* px per mm */
  double tx, ty;  /* px */
} HlView;

HlVec2 hl_view_to_screen (const HlView *view, HlVec2 plan);
HlVec2 hl_view_to_plan (const HlView *view, HlVec2 screen);

/* Fits the plan-frame box [x0, x1] x [y0, y1] into a width x height
 * rectangle with `margin` px on each side, centred.  A degenerate box or
 * rectangle gives a usable view all the same. */
void hl_view_fit_box (HlView *view, double x0, double y0, double x1,
                      double y1, double width, double height, double margin);
/* Multiplies the scale by `factor` (clamped to the limits) keeping the
 * plan point under the screen point (sx, sy) where it is. */
void hl_view_zoom_about (HlView *view, double factor, double sx, double sy);

#ifdef __cplusplus
}
#endif

/* hl-view.c: the plan frame mapped to a drawing.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "hl-view.h"

static inline HlVec2
vec (double x, double y)
{
  return (HlVec2) { x, y };
}

static double
clamp (double v, double lo, double hi)
{
  return v < lo ? lo : v > hi ? hi : v;
}

HlVec2
hl_view_to_screen (const HlView *view, HlVec2 plan)
{
  return vec (plan.x * view->scale + view->tx, -plan.y * view->scale + view->ty);
}

HlVec2
hl_view_to_plan (const HlView *view, HlVec2 screen)
{
  return vec ((screen.x - view->tx) / view->scale,
              -(screen.y - view->ty) / view->scale);
}

void
hl_view_fit_box (HlView *view, double x0, double y0, double x1, double y1,
                 double width, double height, double margin)
{
  double bw = fabs (x1 - x0), bh = fabs (y1 - y0);
  double aw = width - 2.0 * margin, ah = height - 2.0 * margin;
  if (!(bw > 1.0))
    bw = 1.0;
  if (!(bh > 1.0))
    bh = 1.0;
  if (!(aw > 1.0))
    aw = width > 1.0 ? width : 1.0;
  if (!(ah > 1.0))
    ah = height > 1.0 ? height : 1.0;

  view->scale = clamp (fmin (aw / bw, ah / bh), HL_VIEW_SCALE_MIN,
                        HL_VIEW_SCALE_MAX);
  double cx = 0.5 * (x0 + x1), cy = 0.5 * (y0 + y1);
  view->tx = 0.5 * width - cx * view->scale;
  view->ty = 0.5 * height + cy * view->scale;
}

void
hl_view_zoom_about (HlView *view, double factor, double sx, double sy)
{
  if (!(factor > 0.0) || !isfinite (factor))
    return;
  HlVec2 anchor = hl_view_to_plan (view, vec (sx, sy));
  view->scale = clamp (view->scale * factor, HL_VIEW_SCALE_MIN,
                        HL_VIEW_SCALE_MAX);
  view->tx = sx - anchor.x * view->scale;
  view->ty = sy + anchor.y * view->scale;
}

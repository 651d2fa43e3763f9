/* hl-render-template.h: implant templates drawn over the schematic or the
 * radiograph.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Draws what hl_template_shape (core) computed, at the view's scale, so at
 * the image's magnification over a radiograph (the plan frame is true mm
 * and the underlay is placed by the plan's calibration).  Our own look:
 * the implants in the option's colour of the palette (hl-palette.h) with
 * a light fill and a solid outline; the face line of the cup, the shaft
 * axis and the neck as a dash-dot line; the rotation centre as a ringed
 * cross; the head dotted; the three handles (cup, inclination, stem) as
 * squares, distinct from the round and diamond landmark handles.
 */
#pragma once

#include <cairo.h>
#include "hl-render.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  HL_TEMPLATE_PART_CUP = 0,          /* drag moves the cup centre */
  HL_TEMPLATE_PART_INCLINATION,      /* drag turns the face line */
  HL_TEMPLATE_PART_STEM,             /* drag slides the stem along the axis */
  HL_TEMPLATE_PART_N
} HlTemplatePart;

/* Half the side of a template handle, px. */
#define HL_RENDER_TEMPLATE_HANDLE_PX 5.0

/* hl_render_template (declared in hl-render.h) draws scene->tmpl, with
 * the shape's message in a corner when a part could not be drawn. */

/* The template part under the screen point: a handle within radius_px,
 * else inside the cup's circle (cup) or the stem's body (stem); -1. */
int hl_render_hit_template (const HlTemplateShape *shape, const HlView *view,
                            double sx, double sy, double radius_px);

/* The plan-frame point of a part's handle; false when the part is not
 * drawn. */
bool hl_render_template_handle (const HlTemplateShape *shape, int part,
                                HlVec2 *out);

/* A plain name of a part ("cup", "cup inclination", "stem"), translated. */
const char *hl_template_part_name (int part);

#ifdef __cplusplus
}
#endif

/* hl-underlay.h: a radiograph drawn under the schematic (cairo and
 * gdk-pixbuf only, no GTK: tests and benchmarks need no display).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Loading checks the image's size from its header BEFORE decoding, so a
 * file claiming more than HL_UNDERLAY_MAX_PIXELS is refused without
 * allocating for it.  PNG, JPEG and TIFF are read.
 *
 * Brightness, contrast and invert are applied once into a cached image
 * surface (redone only when they change), and halved copies of it are
 * kept for zoomed-out views, so that a frame is one bilinear or nearest
 * resampling of the visible part: pan and zoom stay fast on large images.
 * Opacity is applied when painting.
 *
 * Placement: the image's top-left corner lies at `origin_mm` in the plan
 * frame, each pixel `mm_per_px` plan mm wide (hl_image_placement); the
 * view maps the plan frame to the screen (hl-render.h).
 */
#pragma once

#include <stdbool.h>
#include <cairo.h>

#include "hl-render.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* 100 megapixels: a decoded image takes 4 bytes a pixel, twice. */
#define HL_UNDERLAY_MAX_PIXELS 100000000LL

typedef struct _HlUnderlay HlUnderlay;

/* Loads an image file.  NULL on failure, with err saying what is wrong
 * with which file: missing, unreadable, not an image of a known kind,
 * too large, or corrupt. */
HlUnderlay *hl_underlay_new_from_file (const char *path, HlError *err);
/* Takes a reference on an ARGB32 or RGB24 image surface (tests, the
 * benchmark).  NULL when it is not one. */
HlUnderlay *hl_underlay_new_from_surface (cairo_surface_t *image);
void hl_underlay_free (HlUnderlay *self);

int hl_underlay_get_width (const HlUnderlay *self);
int hl_underlay_get_height (const HlUnderlay *self);
/* The file it was loaded from, or NULL. */
const char *hl_underlay_get_path (const HlUnderlay *self);

/* brightness -1..1 (added), contrast > 0 (about mid-grey), invert. */
void hl_underlay_set_adjust (HlUnderlay *self, double brightness,
                             double contrast, bool invert);

/* The adjusted grey value 0..1 of a source value 0..1: what the cache
 * holds for each channel. */
double hl_underlay_adjust_value (double v, double brightness, double contrast,
                                 bool invert);

/* Zoom at which the filter changes from bilinear to nearest: one image
 * pixel this many screen pixels wide or more is drawn as a crisp block. */
#define HL_UNDERLAY_NEAREST_FROM 3.0

/* Paints the image at `opacity` (0..1) under whatever is drawn next. */
void hl_underlay_draw (HlUnderlay *self, cairo_t *cr, const HlView *view,
                       HlVec2 origin_mm, double mm_per_px, double opacity);

/* The pixel (u, v) under a plan point, for tests. */
HlVec2 hl_underlay_plan_to_pixel (HlVec2 origin_mm, double mm_per_px, HlVec2 plan);

#ifdef __cplusplus
}
#endif

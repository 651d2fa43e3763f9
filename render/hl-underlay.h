/* hl-underlay.h: a radiograph drawn under the schematic (cairo only, no
 * GTK: tests and benchmarks need no display).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The image is read by the core (hl_gray_image_load: DICOM, PNG, TIFF,
 * JPEG, held as 16-bit grey; sizes checked before decoding).  Halved
 * 16-bit copies are made once, when the underlay is made (so off the main
 * thread when it is made there).
 *
 * Display: window centre and width over the 16-bit values through a
 * 65,536-entry table (the linear window function of DICOM PS3.3
 * C.11.2.1.2.1), then invert.  Each copy is windowed into an image surface
 * only when it is drawn and the window changed, so a window drag redoes
 * the one copy on screen; a frame is one bilinear or nearest resampling of
 * the visible part.  Opacity is applied when painting.
 *
 * Placement: the image's top-left corner lies at `origin_mm` in the plan
 * frame, each pixel `mm_per_px` plan mm wide (hl_image_placement); the
 * view maps the plan frame to the screen (hl-view.h).
 */
#pragma once

#include <stdbool.h>
#include <cairo.h>

#include "hl-gray-image.h"
#include "hl-plan.h"
#include "hl-types.h"
#include "hl-view.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct _HlUnderlay HlUnderlay;

/* Loads an image file (hl_gray_image_load).  NULL on failure, with err
 * saying what is wrong with which file: missing, unreadable, not an image
 * of a known kind, too large, or corrupt. */
HlUnderlay *hl_underlay_new_from_file (const char *path, HlError *err);
/* Takes an image read by the core (owned from then on); NULL when out of
 * memory (the image is freed). */
HlUnderlay *hl_underlay_new_from_gray (HlGrayImage *img);
/* The grey (luma) of an ARGB32 or RGB24 image surface, 8 bits (tests).
 * NULL when it is not one. */
HlUnderlay *hl_underlay_new_from_surface (cairo_surface_t *image);
void hl_underlay_free (HlUnderlay *self);
/* An independent copy: image, window and inversion (NULL when memory runs
 * out), for work that outlives the original, such as a print. */
HlUnderlay *hl_underlay_copy (const HlUnderlay *src);

int hl_underlay_get_width (const HlUnderlay *self);
int hl_underlay_get_height (const HlUnderlay *self);
/* The file it was loaded from, or NULL. */
const char *hl_underlay_get_path (const HlUnderlay *self);

/* The image as read: size, bits, the file's window, notes, flags. */
const HlGrayImage *hl_underlay_get_image (const HlUnderlay *self);

/* Window centre and width (> 0) in the held grey values, and invert. */
void hl_underlay_set_window (HlUnderlay *self, double centre, double width,
                             bool invert);
/* The image's own window (its preset or the automatic one), worked out
 * once when the underlay was made (hl_gray_image_default_window). */
void hl_underlay_get_default_window (const HlUnderlay *self, double *centre,
                                     double *width);

/* The shown grey 0..1 of held value v under a window (DICOM's linear
 * window function), inverted when asked. */
double hl_underlay_window_value (double v, double centre, double width, bool invert);

/* Zoom at which the filter changes from bilinear to nearest: one image
 * pixel this many screen pixels wide or more is drawn as a crisp block. */
#define HL_UNDERLAY_NEAREST_FROM 3.0

/* Paints the image at `opacity` (0..1) under whatever is drawn next. */
void hl_underlay_draw (HlUnderlay *self, cairo_t *cr, const HlView *view,
                       HlVec2 origin_mm, double mm_per_px, double opacity);

/* ---- Exports ------------------------------------------------------------ */

/* The plan's radiograph for an export (figure, report, print), shown as
 * the window shows it: the file checked against the plan's digest and read
 * by the core (hl_image_load_checked), windowed with the plan's window or
 * the image's default (hl_radiograph_display_window), inverted as the plan
 * says.  NULL with err saying why when the plan has none, its calibration
 * gives no magnification to place it with, or the file is missing,
 * changed, unreadable or cannot be decoded: the export then goes on
 * without it and says so. */
HlUnderlay *hl_underlay_for_plan (const HlPlan *plan, HlError *err);

/* Paints the image where the plan's calibration puts it
 * (hl_image_placement), at the plan's opacity, under whatever is drawn
 * next.  `detail` is the device pixels per drawing unit the copy is chosen
 * for: 1 for a PNG (px), about 4 for a PDF drawn in points and printed at
 * 300 dpi.  False, drawing nothing, when the calibration gives no
 * magnification. */
bool hl_underlay_draw_plan (HlUnderlay *self, cairo_t *cr, const HlPlan *plan,
                            const HlView *view, double detail);

/* The pixel (u, v) under a plan point, for tests. */
HlVec2 hl_underlay_plan_to_pixel (HlVec2 origin_mm, double mm_per_px, HlVec2 plan);

#ifdef __cplusplus
}
#endif

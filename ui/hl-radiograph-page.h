/* hl-radiograph-page.h: the side panel's "Radiograph" page.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Import of the patient's radiograph (PNG, JPEG, TIFF) under the
 * schematic, its display (brightness, contrast, invert, opacity, the
 * schematic shown or not), the pixel spacing, the calibration (a marker
 * of known diameter, two points a known distance apart, a typed factor,
 * or none: the assumed 1.20, said so), a calibrate mode in which the next
 * clicks on the canvas place the calibration points, the guided placement
 * of the landmarks one by one, and the radiographic measures of native and
 * every option beside the other side.  The page scrolls within itself and
 * goes into the side panel as it is; its template is
 * ui/hl-radiograph-page.ui.
 *
 * Every edit goes through the document (an undo step, then the one
 * recompute path); the page computes nothing itself, it calls the core.
 *
 * Test hooks (environment):
 *  - HIPLEVER_TEST_UNDERLAY=FILE imports FILE at start-up as if chosen in
 *    the file chooser;
 *  - HIPLEVER_BENCHMARK_UNDERLAY=1 pans and zooms over a generated
 *    4000 x 4000 image, prints the median and 95th percentile frame times
 *    and quits (hl_radiograph_page_run_benchmark).
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-canvas.h"
#include "hl-document.h"

#include "hl-underlay.h"

G_BEGIN_DECLS

#define HL_TYPE_RADIOGRAPH_PAGE (hl_radiograph_page_get_type ())
G_DECLARE_FINAL_TYPE (HlRadiographPage, hl_radiograph_page, HL, RADIOGRAPH_PAGE, GtkBox)

/* The page for `document`, drawing its radiograph under `canvas` and
 * taking the canvas's clicks in calibrate and guided placement modes; both
 * borrowed.  It follows the document's "changed" signal: reloads the
 * image when the plan's reference changed (a plan opened, an undo) and
 * reports a moved or changed image. */
GtkWidget *hl_radiograph_page_new (HlDocument *document, HlCanvas *canvas);

/* Imports the image file at `path` as if chosen in the file chooser (the
 * drag benchmark). */
void hl_radiograph_page_import (HlRadiographPage *self, const char *path);

/* The plan's radiograph as the window shows it (decoded, checked against
 * the plan's digest, windowed and inverted as the plan says), borrowed,
 * for the exports to draw without reading the file again; NULL while it
 * loads, when the plan has none, or when it could not be used. */
HlUnderlay *hl_radiograph_page_get_underlay (HlRadiographPage *self);

/* From the handle printer (HIPLEVER_TEST_PRINT_HANDLES): WIDGET lines for
 * the page's controls and "VIEW scale tx ty x0 y0" (the canvas view and
 * the canvas's top-left corner in window surface coordinates) and
 * "RADIOGRAPH origin-x origin-y mm-per-pixel magnification". */
void hl_radiograph_page_print_handles (HlRadiographPage *self);

G_END_DECLS

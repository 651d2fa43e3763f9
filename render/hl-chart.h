/* hl-chart.h: charts of joint load and abductor force, drawn with cairo alone.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Four charts, each against one thing a surgeon can change: the femoral
 * offset change of each option, the cane force, and the load carried in
 * either hand.  Each has one curve per option plus the native hip, the
 * plan's current setting marked, and optionally the Monte Carlo 5-95%
 * band of every curve.
 *
 * Two steps, so that the window can recompute while dragging and redraw
 * as often as it likes:
 *
 *  1. hl_chart_data_new (core/hl-chart-data.h) runs the core and keeps
 *     the numbers;
 *  2. hl_chart_draw draws them into any rectangle of any cairo context
 *     (screen, PDF, SVG, PNG) and computes no mechanics.
 *
 * Colours are the Okabe & Ito hues of hl-palette.h (native in the text
 * colour); every curve also has its own line style, so the charts read
 * in grey and for colour-blind readers.
 */
#pragma once

#include <stdbool.h>
#include <cairo.h>

#include "hl-chart-data.h"
#include "hl-palette.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- Style ------------------------------------------------------------ */

typedef struct {
  bool dark;
  HlRgba fg;                 /* text, axes, the native curve */
  HlRgba bg;
  HlRgba grid;
  bool paint_background;
  bool show_title;
  bool show_legend;          /* inside the chart; a report draws one for all */
  bool show_bands;           /* when the data have them */
  bool show_current;
  double font_px;
  double line_px;
} HlChartStyle;

/* Light (reports, figures) or dark. */
void hl_chart_style_init (HlChartStyle *style, bool dark);

/* Colour and line style of a row (0 = native); dashes as hl_palette_dashes. */
HlRgba hl_chart_series_color (size_t row, bool dark);
int hl_chart_series_dashes (size_t row, double dashes[HL_PALETTE_DASHES_MAX]);

/* Draws one chart into the rectangle (x, y, width, height) in user units. */
void hl_chart_draw (cairo_t *cr, const HlChartData *data,
                    HlChartQuantity quantity, const HlChartStyle *style,
                    double x, double y, double width, double height);

/* Draws a legend of the rows in one or more lines from (x, y), at most
 * `width` wide; returns its height.  With `draw` false only measures. */
double hl_chart_draw_legend (cairo_t *cr, const HlChartData *data,
                             const HlChartStyle *style, double x, double y,
                             double width, bool with_bands, bool draw);

#ifdef __cplusplus
}
#endif

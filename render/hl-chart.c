/* hl-chart.c: charts of joint load and abductor force (cairo only), drawn
 * from the numbers of core/hl-chart-data.c.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-chart.h"
#include "hl-i18n.h"

/* Tick spacing aims at about this many intervals. */
#define HL_CHART_X_TICKS 6
#define HL_CHART_Y_TICKS 5
/* Band fill opacity: several bands overlap and the curves stay legible. */
#define HL_CHART_BAND_ALPHA 0.12
#define HL_CHART_GRID_ALPHA 0.22
#define HL_CHART_MARK_RADIUS 3.2
#define HL_CHART_LEGEND_SAMPLE 22.0

/* ---- Style ---------------------------------------------------------------- */

void
hl_chart_style_init (HlChartStyle *style, bool dark)
{
  memset (style, 0, sizeof *style);
  style->dark = dark;
  if (dark)
    {
      style->fg = (HlRgba) { 0.92, 0.92, 0.90, 1.0 };
      style->bg = (HlRgba) { 0.13, 0.13, 0.14, 1.0 };
    }
  else
    {
      style->fg = (HlRgba) { 0.10, 0.11, 0.12, 1.0 };
      style->bg = (HlRgba) { 1.0, 1.0, 1.0, 1.0 };
    }
  style->grid = style->fg;
  style->grid.a = HL_CHART_GRID_ALPHA;
  style->paint_background = true;
  style->show_title = true;
  style->show_legend = true;
  style->show_bands = true;
  style->show_current = true;
  style->font_px = 11.0;
  style->line_px = 1.6;
}

/* Options take the palette's hues in this order (its yellow, too faint on
 * white, is left out); native is drawn in the text colour. */
static const HlPaletteRole series_roles[] = {
  HL_ROLE_WEIGHT, HL_ROLE_JOINT, HL_ROLE_ABDUCTOR, HL_ROLE_CANE, HL_ROLE_LOAD,
};
#define N_SERIES_ROLES (sizeof series_roles / sizeof series_roles[0])

HlRgba
hl_chart_series_color (size_t row, bool dark)
{
  if (row == 0)
    return dark ? (HlRgba) { 0.92, 0.92, 0.90, 1.0 } : (HlRgba) { 0.10, 0.11, 0.12, 1.0 };
  return hl_palette_color (series_roles[(row - 1) % N_SERIES_ROLES], dark);
}

/* Native solid; options dashed, dash-dot, dotted, long dash, dash-dot-dot,
 * then the colours come round again with the next pattern. */
int
hl_chart_series_dashes (size_t row, double dashes[HL_PALETTE_DASHES_MAX])
{
  static const double patterns[][HL_PALETTE_DASHES_MAX] = {
    { 7.0, 3.5, 0.0, 0.0 },
    { 8.0, 3.0, 1.6, 3.0 },
    { 1.6, 2.6, 0.0, 0.0 },
    { 12.0, 4.0, 0.0, 0.0 },
    { 5.0, 2.5, 1.6, 2.5 },
    { 3.5, 3.5, 0.0, 0.0 },
  };
  static const int lengths[] = { 2, 4, 2, 2, 4, 2 };
  const size_t n = sizeof lengths / sizeof lengths[0];

  if (row == 0)
    return 0;
  size_t i = (row - 1) % n;
  memcpy (dashes, patterns[i], sizeof patterns[i]);
  return lengths[i];
}

static void
set_rgba (cairo_t *cr, HlRgba c)
{
  cairo_set_source_rgba (cr, c.r, c.g, c.b, c.a);
}

static void
set_series (cairo_t *cr, size_t row, const HlChartStyle *style)
{
  double dashes[HL_PALETTE_DASHES_MAX];
  int n = hl_chart_series_dashes (row, dashes);
  double w = row == 0 ? style->line_px * 1.35 : style->line_px;

  for (int i = 0; i < n; i++)
    dashes[i] *= style->line_px / 1.6;
  set_rgba (cr, row == 0 ? style->fg : hl_chart_series_color (row, style->dark));
  cairo_set_line_width (cr, w);
  cairo_set_dash (cr, dashes, n, 0.0);
}

/* ---- Ticks ---------------------------------------------------------------- */

/* A "nice" step of 1, 2 or 5 times a power of ten for about `n` intervals. */
static double
nice_step (double span, int n)
{
  double raw = span / n;
  double p = pow (10.0, floor (log10 (raw)));
  double f = raw / p;
  return (f < 1.5 ? 1.0 : f < 3.0 ? 2.0 : f < 7.0 ? 5.0 : 10.0) * p;
}

static int
step_decimals (double step)
{
  int d = (int) ceil (-log10 (step) - 1e-9);
  return d < 0 ? 0 : d;
}

/* ---- Text ----------------------------------------------------------------- */

static void
text_at (cairo_t *cr, const char *s, double x, double y, double align_x,
         double align_y)
{
  cairo_text_extents_t e;
  cairo_font_extents_t fe;
  cairo_text_extents (cr, s, &e);
  cairo_font_extents (cr, &fe);
  /* align_y 0: y is the top of the text, 0.5 its middle, 1 its bottom. */
  cairo_move_to (cr, x - align_x * e.x_advance,
                 y + (1.0 - align_y) * fe.ascent - align_y * fe.descent);
  cairo_show_text (cr, s);
}

static void
set_font (cairo_t *cr, double px, bool bold)
{
  cairo_select_font_face (cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                          bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size (cr, px);
}

/* ---- Drawing -------------------------------------------------------------- */

static void
draw_band (cairo_t *cr, const HlChartData *d, HlChartQuantity q, size_t row,
           double (*sx) (const void *, double), double (*sy) (const void *, double),
           const void *map, const HlChartStyle *style)
{
  size_t nb = d->n_band_steps;
  size_t j = 0;

  while (j < nb)
    {
      while (j < nb && !d->band_valid[row * nb + j])
        j++;
      size_t start = j;
      while (j < nb && d->band_valid[row * nb + j])
        j++;
      if (j - start < 2)
        continue;
      cairo_new_path (cr);
      for (size_t k = start; k < j; k++)
        cairo_line_to (cr, sx (map, d->band_x[k]),
                       sy (map, hl_chart_band_value (&d->bands[row * nb + k], q, -1)));
      for (size_t k = j; k-- > start;)
        cairo_line_to (cr, sx (map, d->band_x[k]),
                       sy (map, hl_chart_band_value (&d->bands[row * nb + k], q, 1)));
      cairo_close_path (cr);
      HlRgba c = row == 0 ? style->fg : hl_chart_series_color (row, style->dark);
      c.a = HL_CHART_BAND_ALPHA;
      set_rgba (cr, c);
      cairo_fill (cr);
    }
}

typedef struct {
  double x0, x1, y0, y1;      /* data range */
  double left, right, top, bottom;  /* plot rectangle */
} HlChartMap;

static double
map_x (const void *p, double v)
{
  const HlChartMap *m = p;
  return m->left + (v - m->x0) / (m->x1 - m->x0) * (m->right - m->left);
}

static double
map_y (const void *p, double v)
{
  const HlChartMap *m = p;
  return m->bottom - (v - m->y0) / (m->y1 - m->y0) * (m->bottom - m->top);
}

static void
draw_curve (cairo_t *cr, const HlChartData *d, HlChartQuantity q, size_t row,
            const HlChartMap *m, const HlChartStyle *style)
{
  size_t n = d->spec.n_steps;
  bool pen = false;

  cairo_new_path (cr);
  for (size_t i = 0; i < n; i++)
    {
      size_t k = row * n + i;
      double v = d->status[k] == HL_OK ? hl_chart_value (&d->results[k], q) : NAN;
      if (!isfinite (v))
        {
          pen = false;
          continue;
        }
      if (pen)
        cairo_line_to (cr, map_x (m, d->x[i]), map_y (m, v));
      else
        cairo_move_to (cr, map_x (m, d->x[i]), map_y (m, v));
      pen = true;
    }
  set_series (cr, row, style);
  cairo_stroke (cr);
}

static void
draw_message (cairo_t *cr, const HlChartStyle *style, const char *msg, double x,
              double y, double w, double h)
{
  set_font (cr, style->font_px, false);
  set_rgba (cr, style->fg);
  text_at (cr, msg, x + 0.5 * w, y + 0.5 * h, 0.5, 0.5);
}

void
hl_chart_draw (cairo_t *cr, const HlChartData *d, HlChartQuantity q,
               const HlChartStyle *style, double x, double y, double width,
               double height)
{
  const double fs = style->font_px;
  const bool bands = style->show_bands && d != NULL && d->bands != NULL;
  char label[64];

  cairo_save (cr);
  cairo_rectangle (cr, x, y, width, height);
  cairo_clip (cr);
  if (style->paint_background)
    {
      set_rgba (cr, style->bg);
      cairo_paint (cr);
    }

  double top = y + (style->show_title ? 1.9 * fs : 0.6 * fs);
  if (style->show_title && d != NULL)
    {
      set_font (cr, fs * 1.05, true);
      set_rgba (cr, style->fg);
      text_at (cr, hl_chart_kind_title (d->kind), x + 0.2 * fs, y + 0.3 * fs, 0.0, 0.0);
    }
  double legend_h = 0.0;
  if (style->show_legend && d != NULL)
    legend_h = hl_chart_draw_legend (cr, d, style, x + 0.2 * fs, 0, width - 0.4 * fs,
                                     bands, false) + 0.4 * fs;

  double lo, hi;
  if (d == NULL || !hl_chart_y_range (d, q, bands, &lo, &hi))
    {
      draw_message (cr, style, _("Nothing to draw: the plan cannot be solved."),
                    x, top, width, height - (top - y));
      cairo_restore (cr);
      return;
    }

  HlChartMap m = { d->spec.from, d->spec.to, lo, hi, 0, 0, 0, 0 };
  if (m.x1 <= m.x0)
    m.x1 = m.x0 + 1.0;

  /* Room for the y tick labels and the two axis titles. */
  double ystep = nice_step (hi - lo, HL_CHART_Y_TICKS);
  int ydec = step_decimals (ystep);
  set_font (cr, fs * 0.9, false);
  double tick_w = 0.0;
  for (double t = ceil (lo / ystep) * ystep; t <= hi + 1e-9 * ystep; t += ystep)
    {
      cairo_text_extents_t e;
      snprintf (label, sizeof label, "%.*f", ydec, t);
      cairo_text_extents (cr, label, &e);
      tick_w = fmax (tick_w, e.x_advance);
    }
  m.left = x + 1.6 * fs + tick_w + 0.5 * fs;
  m.right = x + width - 0.8 * fs;
  m.top = top;
  m.bottom = y + height - legend_h - 2.9 * fs;
  if (m.bottom - m.top < 2.0 * fs || m.right - m.left < 4.0 * fs)
    {
      cairo_restore (cr);
      return;
    }

  /* Grid, ticks and tick labels. */
  cairo_set_line_width (cr, 0.6);
  cairo_set_dash (cr, NULL, 0, 0.0);
  for (double t = ceil (lo / ystep) * ystep; t <= hi + 1e-9 * ystep; t += ystep)
    {
      double py = map_y (&m, t);
      set_rgba (cr, style->grid);
      cairo_move_to (cr, m.left, py);
      cairo_line_to (cr, m.right, py);
      cairo_stroke (cr);
      set_rgba (cr, style->fg);
      snprintf (label, sizeof label, "%.*f", ydec, fabs (t) < 0.5 * ystep ? 0.0 : t);
      text_at (cr, label, m.left - 0.35 * fs, py, 1.0, 0.5);
    }
  double xstep = nice_step (m.x1 - m.x0, HL_CHART_X_TICKS);
  int xdec = step_decimals (xstep);
  for (double t = ceil (m.x0 / xstep) * xstep; t <= m.x1 + 1e-9 * xstep; t += xstep)
    {
      double px = map_x (&m, t);
      set_rgba (cr, style->grid);
      cairo_move_to (cr, px, m.top);
      cairo_line_to (cr, px, m.bottom);
      cairo_stroke (cr);
      set_rgba (cr, style->fg);
      cairo_move_to (cr, px, m.bottom);
      cairo_line_to (cr, px, m.bottom + 0.3 * fs);
      cairo_stroke (cr);
      snprintf (label, sizeof label, "%.*f", xdec, fabs (t) < 0.5 * xstep ? 0.0 : t);
      text_at (cr, label, px, m.bottom + 0.4 * fs, 0.5, 0.0);
    }

  /* Axis titles. */
  set_font (cr, fs * 0.9, false);
  set_rgba (cr, style->fg);
  text_at (cr, hl_chart_kind_axis (d->kind), 0.5 * (m.left + m.right),
           m.bottom + 1.55 * fs, 0.5, 0.0);
  cairo_save (cr);
  cairo_translate (cr, x + 0.25 * fs, 0.5 * (m.top + m.bottom));
  cairo_rotate (cr, -M_PI / 2.0);
  text_at (cr, hl_chart_quantity_axis (q), 0.0, 0.0, 0.5, 0.0);
  cairo_restore (cr);

  /* Bands, curves, current settings, inside the plot. */
  cairo_save (cr);
  cairo_rectangle (cr, m.left, m.top, m.right - m.left, m.bottom - m.top);
  cairo_clip (cr);
  if (bands)
    for (size_t row = 0; row < d->n_rows; row++)
      draw_band (cr, d, q, row, map_x, map_y, &m, style);
  for (size_t row = d->n_rows; row-- > 0;)
    draw_curve (cr, d, q, row, &m, style);

  if (style->show_current)
    {
      if (d->kind != HL_CHART_FEMORAL_OFFSET)
        {
          /* One setting for every row: a vertical line through the marks. */
          double px = map_x (&m, d->current_x[0]);
          double dash[2] = { 2.0, 2.0 };
          HlRgba c = style->fg;
          c.a = 0.55;
          set_rgba (cr, c);
          cairo_set_line_width (cr, 0.8);
          cairo_set_dash (cr, dash, 2, 0.0);
          cairo_move_to (cr, px, m.top);
          cairo_line_to (cr, px, m.bottom);
          cairo_stroke (cr);
        }
      cairo_set_dash (cr, NULL, 0, 0.0);
      for (size_t row = 0; row < d->n_rows; row++)
        {
          if (!d->current_valid[row])
            continue;
          double v = hl_chart_value (&d->current[row], q);
          if (!isfinite (v))
            continue;
          double px = map_x (&m, d->current_x[row]), py = map_y (&m, v);
          cairo_new_path (cr);
          cairo_arc (cr, px, py, HL_CHART_MARK_RADIUS * style->line_px / 1.6, 0, 2 * M_PI);
          set_rgba (cr, style->bg);
          cairo_fill_preserve (cr);
          set_rgba (cr, row == 0 ? style->fg : hl_chart_series_color (row, style->dark));
          cairo_set_line_width (cr, style->line_px);
          cairo_stroke (cr);
        }
    }
  cairo_restore (cr);

  /* Frame. */
  set_rgba (cr, style->fg);
  cairo_set_dash (cr, NULL, 0, 0.0);
  cairo_set_line_width (cr, 0.8);
  cairo_rectangle (cr, m.left, m.top, m.right - m.left, m.bottom - m.top);
  cairo_stroke (cr);

  if (style->show_legend)
    hl_chart_draw_legend (cr, d, style, x + 0.2 * fs, y + height - legend_h + 0.3 * fs,
                          width - 0.4 * fs, bands, true);
  cairo_restore (cr);
}

double
hl_chart_draw_legend (cairo_t *cr, const HlChartData *d, const HlChartStyle *style,
                      double x, double y, double width, bool with_bands, bool draw)
{
  const double fs = style->font_px * 0.9;
  const double line_h = 1.45 * fs;
  const double gap = 1.2 * fs;
  double cx = x, cy = y;

  cairo_save (cr);
  set_font (cr, fs, false);
  size_t n_items = d->n_rows + (style->show_current ? 1 : 0) + (with_bands ? 1 : 0);
  for (size_t item = 0; item < n_items; item++)
    {
      char text[HL_NAME_MAX + 64];
      if (item < d->n_rows)
        snprintf (text, sizeof text, "%s", d->names[item]);
      else if (style->show_current && item == d->n_rows)
        snprintf (text, sizeof text, "%s", _("the plan's setting"));
      else
        snprintf (text, sizeof text, _("5-95%% range (%zu samples per point)"),
                  d->band_samples);
      cairo_text_extents_t e;
      cairo_text_extents (cr, text, &e);
      double w = HL_CHART_LEGEND_SAMPLE + 0.4 * fs + e.x_advance;
      if (cx > x && cx + w > x + width)
        {
          cx = x;
          cy += line_h;
        }
      if (draw)
        {
          double my = cy + 0.5 * line_h;
          if (item < d->n_rows)
            {
              set_series (cr, item, style);
              cairo_move_to (cr, cx, my);
              cairo_line_to (cr, cx + HL_CHART_LEGEND_SAMPLE, my);
              cairo_stroke (cr);
            }
          else if (style->show_current && item == d->n_rows)
            {
              cairo_set_dash (cr, NULL, 0, 0.0);
              cairo_new_path (cr);
              cairo_arc (cr, cx + 0.5 * HL_CHART_LEGEND_SAMPLE, my, HL_CHART_MARK_RADIUS, 0, 2 * M_PI);
              set_rgba (cr, style->bg);
              cairo_fill_preserve (cr);
              set_rgba (cr, style->fg);
              cairo_set_line_width (cr, 1.2);
              cairo_stroke (cr);
            }
          else
            {
              HlRgba c = style->fg;
              c.a = HL_CHART_BAND_ALPHA * 1.5;
              set_rgba (cr, c);
              cairo_rectangle (cr, cx, my - 0.3 * fs, HL_CHART_LEGEND_SAMPLE, 0.6 * fs);
              cairo_fill (cr);
            }
          set_rgba (cr, style->fg);
          text_at (cr, text, cx + HL_CHART_LEGEND_SAMPLE + 0.4 * fs, my, 0.0, 0.5);
        }
      cx += w + gap;
    }
  cairo_restore (cr);
  return cy + line_h - y;
}


/* hl-chart.c: charts of joint load and abductor force (cairo only).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-buf.h"
#include "hl-chart.h"
#include "hl-i18n.h"

/* Each end of a chart's range reaches this far past the plan's own
 * settings, so that a current mark never sits on the frame. */
#define HL_CHART_RANGE_MARGIN 0.15
/* Y ranges are padded by this share of their span; a flat curve gets
 * this much room in its own unit. */
#define HL_CHART_Y_PAD 0.06
#define HL_CHART_Y_FLAT_SPAN 0.1
/* Tick spacing aims at about this many intervals. */
#define HL_CHART_X_TICKS 6
#define HL_CHART_Y_TICKS 5
/* Band fill opacity: several bands overlap and the curves stay legible. */
#define HL_CHART_BAND_ALPHA 0.12
#define HL_CHART_GRID_ALPHA 0.22
#define HL_CHART_MARK_RADIUS 3.2
#define HL_CHART_LEGEND_SAMPLE 22.0
/* Sweep CSV precision: the same as `hiplever-cli solve --format csv`. */
#define HL_CSV_PRECISION 3
#define HL_CSV_RATIO_PRECISION 4

/* ---- Words ---------------------------------------------------------------- */

const char *
hl_chart_kind_title (HlChartKind kind)
{
  switch (kind)
    {
    case HL_CHART_FEMORAL_OFFSET:
      return _("Against femoral offset change");
    case HL_CHART_CANE_FORCE:
      return _("Against cane force");
    case HL_CHART_LOAD_CONTRA:
      return _("Against a load in the opposite hand");
    case HL_CHART_LOAD_IPSI:
      return _("Against a load in the same-side hand");
    case HL_CHART_N:
    default:
      break;
    }
  return "";
}

const char *
hl_chart_kind_axis (HlChartKind kind)
{
  switch (kind)
    {
    case HL_CHART_FEMORAL_OFFSET:
      return _("Femoral offset change of the option (mm, + lateral)");
    case HL_CHART_CANE_FORCE:
      return _("Cane force (N)");
    case HL_CHART_LOAD_CONTRA:
      return _("Load in the hand opposite the operated hip (kg)");
    case HL_CHART_LOAD_IPSI:
      return _("Load in the hand on the operated side (kg)");
    case HL_CHART_N:
    default:
      break;
    }
  return "";
}

const char *
hl_chart_quantity_axis (HlChartQuantity quantity)
{
  return quantity == HL_CHART_ABDUCTOR ? _("Abductor force (xBW)")
                                       : _("Joint reaction force (xBW)");
}

double
hl_chart_value (const HlResult *res, HlChartQuantity quantity)
{
  return quantity == HL_CHART_ABDUCTOR ? res->abductor_force_bw : res->jrf_bw;
}

static double
band_value (const HlMcSummary *s, HlChartQuantity quantity, int which)
{
  const HlPercentiles *p = quantity == HL_CHART_ABDUCTOR ? &s->abductor_force_bw
                                                         : &s->jrf_bw;
  return which < 0 ? p->p05 : which > 0 ? p->p95 : p->p50;
}

/* ---- Data ----------------------------------------------------------------- */

static HlSweepParam
kind_param (HlChartKind kind)
{
  switch (kind)
    {
    case HL_CHART_CANE_FORCE:
      return HL_SWEEP_CANE_FORCE_N;
    case HL_CHART_LOAD_CONTRA:
      return HL_SWEEP_LOAD_CONTRA_KG;
    case HL_CHART_LOAD_IPSI:
      return HL_SWEEP_LOAD_IPSI_KG;
    case HL_CHART_FEMORAL_OFFSET:
    case HL_CHART_N:
    default:
      break;
    }
  return HL_SWEEP_FEMORAL_OFFSET;
}

/* The plan's current value of the chart's parameter for one row. */
static double
plan_current_x (const HlPlan *plan, HlChartKind kind, size_t row)
{
  switch (kind)
    {
    case HL_CHART_FEMORAL_OFFSET:
      return row == 0 ? 0.0 : plan->options[row - 1].recon.femoral_offset_mm;
    case HL_CHART_CANE_FORCE:
      return hl_plan_cane_force (plan);
    case HL_CHART_LOAD_CONTRA:
      return plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg;
    case HL_CHART_LOAD_IPSI:
      return plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg;
    case HL_CHART_N:
    default:
      break;
    }
  return 0.0;
}

/* The sweep range: the defaults widened to every current setting, inside
 * what a plan accepts. */
static void
chart_range (const HlPlan *plan, HlChartKind kind, double *from, double *to)
{
  const HlSweepParamInfo *info = hl_sweep_param_info (kind_param (kind));
  double lo = info->default_from, hi = info->default_to;
  double max = info->max;

  if (kind == HL_CHART_CANE_FORCE)
    max = hl_plan_body_weight (plan);
  for (size_t row = kind == HL_CHART_FEMORAL_OFFSET ? 1 : 0;
       row <= plan->n_options; row++)
    {
      double v = plan_current_x (plan, kind, row);
      lo = fmin (lo, v);
      hi = fmax (hi, v);
      if (kind != HL_CHART_FEMORAL_OFFSET)
        break;
    }
  double margin = HL_CHART_RANGE_MARGIN * (hi - lo);
  if (lo < info->default_from)
    lo -= margin;
  if (hi > info->default_to)
    hi += margin;
  *from = fmax (lo, info->min);
  *to = fmin (hi, max);
}

/* A copy of the plan with the chart's parameter at x for every row. */
static HlPlan *
plan_at (const HlPlan *plan, HlChartKind kind, double x)
{
  HlPlan *p = hl_plan_copy (plan);
  if (p == NULL)
    return NULL;
  switch (kind)
    {
    case HL_CHART_FEMORAL_OFFSET:
      for (size_t i = 0; i < p->n_options; i++)
        {
          /* the chart's offset replaces what a template would derive (a
           * templated option's stored head length is 0) */
          p->options[i].recon.tmpl.on = false;
          p->options[i].recon.femoral_offset_mm = x;
        }
      break;
    case HL_CHART_CANE_FORCE:
      p->cane.enabled = true;
      p->cane.unit = HL_FORCE_UNIT_N;
      p->cane.value = x;
      break;
    case HL_CHART_LOAD_CONTRA:
      p->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = x;
      break;
    case HL_CHART_LOAD_IPSI:
      p->loads.hand[HL_HAND_IPSILATERAL].mass_kg = x;
      break;
    case HL_CHART_N:
    default:
      break;
    }
  return p;
}

static HlStatus
compute_bands (HlChartData *d, const HlPlan *plan, const HlMcSettings *mc,
               HlError *err)
{
  size_t nb = d->n_band_steps;
  HlMcSummary *row_summary = calloc (d->n_rows, sizeof *row_summary);
  HlMcWorkspace *ws = hl_mc_workspace_new (mc->n_samples,
                                           plan->n_options > 0 ? plan->n_options : 1);
  HlStatus st = HL_OK;

  if (row_summary == NULL || ws == NULL)
    st = hl_error_set (err, HL_ERR_NOMEM, "chart", "%s",
                       _("There is not enough memory for the uncertainty bands."));
  for (size_t j = 0; st == HL_OK && j < nb; j++)
    {
      HlSweepSpec band = d->spec;
      band.n_steps = nb;
      d->band_x[j] = hl_sweep_value (&band, j);

      HlPlan *p = plan_at (plan, d->kind, d->band_x[j]);
      HlModel model;
      HlError step_err;
      hl_error_clear (&step_err);
      if (p == NULL)
        {
          st = hl_error_set (err, HL_ERR_NOMEM, "chart", "%s",
                             _("There is not enough memory for the uncertainty bands."));
          break;
        }
      /* A point that cannot be solved has no band there; the others do. */
      bool ok = hl_model_prepare (&model, p, &step_err) == HL_OK
                && hl_mc_run (ws, &model, p->options, p->n_options, mc, row_summary,
                              &d->band_info, &step_err) == HL_OK
                && d->band_info.n_used > 0;
      for (size_t row = 0; row < d->n_rows; row++)
        {
          d->band_valid[row * nb + j] = ok;
          if (ok)
            d->bands[row * nb + j] = row_summary[row];
        }
      hl_plan_free (p);
    }
  hl_mc_workspace_free (ws);
  free (row_summary);
  return st;
}

HlChartData *
hl_chart_data_new (const HlPlan *plan, HlChartKind kind, size_t n_steps,
                   size_t n_band_steps, const HlMcSettings *mc, HlError *err)
{
  if ((int) kind < 0 || kind >= HL_CHART_N)
    {
      hl_error_set (err, HL_ERR_INVALID, "chart", _("Unknown chart %d."), (int) kind);
      return NULL;
    }
  if (n_steps < 2 || n_steps > HL_SWEEP_STEPS_MAX)
    {
      hl_error_set (err, HL_ERR_INVALID, "chart steps",
                    _("A chart needs 2 to %d points per curve, not %zu."),
                    HL_SWEEP_STEPS_MAX, n_steps);
      return NULL;
    }
  if (mc != NULL && (n_band_steps < 2 || n_band_steps > HL_CHART_BAND_STEPS_MAX))
    {
      hl_error_set (err, HL_ERR_INVALID, "chart band steps",
                    _("A band needs 2 to %d points, not %zu."),
                    HL_CHART_BAND_STEPS_MAX, n_band_steps);
      return NULL;
    }

  HlModel model;
  if (hl_model_prepare (&model, plan, err) != HL_OK)
    return NULL;

  HlChartData *d = calloc (1, sizeof *d);
  if (d == NULL)
    {
      hl_error_set (err, HL_ERR_NOMEM, "chart", "%s", _("There is not enough memory for the chart."));
      return NULL;
    }
  d->kind = kind;
  d->n_rows = 1 + plan->n_options;
  d->spec.param = kind_param (kind);
  d->spec.n_steps = n_steps;
  chart_range (plan, kind, &d->spec.from, &d->spec.to);

  size_t n = d->n_rows * n_steps;
  d->names = calloc (d->n_rows, sizeof *d->names);
  d->x = calloc (n_steps, sizeof *d->x);
  d->results = calloc (n, sizeof *d->results);
  d->status = calloc (n, sizeof *d->status);
  d->current_valid = calloc (d->n_rows, sizeof *d->current_valid);
  d->current_x = calloc (d->n_rows, sizeof *d->current_x);
  d->current = calloc (d->n_rows, sizeof *d->current);
  if (mc != NULL)
    {
      d->n_band_steps = n_band_steps;
      d->band_samples = mc->n_samples;
      d->band_x = calloc (n_band_steps, sizeof *d->band_x);
      d->bands = calloc (d->n_rows * n_band_steps, sizeof *d->bands);
      d->band_valid = calloc (d->n_rows * n_band_steps, sizeof *d->band_valid);
    }
  if (d->names == NULL || d->x == NULL || d->results == NULL || d->status == NULL
      || d->current_valid == NULL || d->current_x == NULL || d->current == NULL
      || (mc != NULL && (d->band_x == NULL || d->bands == NULL || d->band_valid == NULL)))
    {
      hl_chart_data_free (d);
      hl_error_set (err, HL_ERR_NOMEM, "chart", "%s", _("There is not enough memory for the chart."));
      return NULL;
    }

  snprintf (d->names[0], HL_NAME_MAX, "%s", _("Native"));
  for (size_t i = 0; i < plan->n_options; i++)
    snprintf (d->names[1 + i], HL_NAME_MAX, "%s", plan->options[i].name);

  /* Points that cannot be solved stay NaN and are left out of the curve. */
  HlError sweep_err;
  hl_error_clear (&sweep_err);
  hl_sweep_run (plan, &model, &d->spec, d->x, d->results, d->status, n, &sweep_err);

  for (size_t row = 0; row < d->n_rows; row++)
    {
      const HlRecon *recon = row == 0 ? NULL : &plan->options[row - 1].recon;
      HlError solve_err;
      hl_error_clear (&solve_err);
      d->current_x[row] = plan_current_x (plan, kind, row);
      d->current_valid[row] = !(kind == HL_CHART_FEMORAL_OFFSET && row == 0)
                              && hl_model_solve (&model, recon, &d->current[row],
                                                 &solve_err) == HL_OK;
    }

  if (mc != NULL && compute_bands (d, plan, mc, err) != HL_OK)
    {
      hl_chart_data_free (d);
      return NULL;
    }
  return d;
}

void
hl_chart_data_free (HlChartData *d)
{
  if (d == NULL)
    return;
  free (d->names);
  free (d->x);
  free (d->results);
  free (d->status);
  free (d->current_valid);
  free (d->current_x);
  free (d->current);
  free (d->band_x);
  free (d->bands);
  free (d->band_valid);
  free (d);
}

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

/* ---- Ranges and ticks ------------------------------------------------------ */

bool
hl_chart_y_range (const HlChartData *d, HlChartQuantity q, bool with_bands,
                  double *lo, double *hi)
{
  double a = INFINITY, b = -INFINITY;
  size_t n = d->spec.n_steps;

  for (size_t i = 0; i < d->n_rows * n; i++)
    if (d->status[i] == HL_OK)
      {
        double v = hl_chart_value (&d->results[i], q);
        if (isfinite (v))
          a = fmin (a, v), b = fmax (b, v);
      }
  for (size_t row = 0; row < d->n_rows; row++)
    if (d->current_valid[row])
      {
        double v = hl_chart_value (&d->current[row], q);
        if (isfinite (v))
          a = fmin (a, v), b = fmax (b, v);
      }
  if (with_bands && d->bands != NULL)
    for (size_t i = 0; i < d->n_rows * d->n_band_steps; i++)
      if (d->band_valid[i])
        {
          double l = band_value (&d->bands[i], q, -1);
          double h = band_value (&d->bands[i], q, 1);
          if (isfinite (l) && isfinite (h))
            a = fmin (a, l), b = fmax (b, h);
        }
  if (!(a <= b))
    return false;
  double span = b - a;
  if (span < HL_CHART_Y_FLAT_SPAN)
    {
      double mid = 0.5 * (a + b);
      a = mid - 0.5 * HL_CHART_Y_FLAT_SPAN;
      b = mid + 0.5 * HL_CHART_Y_FLAT_SPAN;
      span = HL_CHART_Y_FLAT_SPAN;
    }
  *lo = fmax (0.0, a - HL_CHART_Y_PAD * span);
  *hi = b + HL_CHART_Y_PAD * span;
  return true;
}

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
                       sy (map, band_value (&d->bands[row * nb + k], q, -1)));
      for (size_t k = j; k-- > start;)
        cairo_line_to (cr, sx (map, d->band_x[k]),
                       sy (map, band_value (&d->bands[row * nb + k], q, 1)));
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

/* ---- CSV ------------------------------------------------------------------ */

static void
csv_number (HlBuf *b, double v, int precision)
{
  char num[64];
  if (!isfinite (v))
    snprintf (num, sizeof num, ",nan");
  else
    {
      snprintf (num, sizeof num, ",%.*f", precision, v);
      /* "-0.000" reads as a sign that is not there. */
      char *p = num + 1;
      if (*p == '-' && strspn (p + 1, "0.") == strlen (p + 1))
        memmove (p, p + 1, strlen (p));
    }
  hl_buf_puts (b, num);
}

HlStatus
hl_sweep_to_csv (const HlPlan *plan, const HlSweepSpec *spec, const double *values,
                 const HlResult *results, const HlStatus *status, char **out,
                 size_t *size, HlError *err)
{
  const HlSweepParamInfo *info = hl_sweep_param_info (spec->param);
  if (info == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "sweep parameter",
                         _("Unknown sweep parameter %d"), (int) spec->param);

  locale_t c_locale = newlocale (LC_NUMERIC_MASK, "C", (locale_t) 0);
  if (c_locale == (locale_t) 0)
    return hl_error_set (err, HL_ERR_NOMEM, "sweep", "%s",
                         _("Cannot set up the C locale for numbers"));
  locale_t old = uselocale (c_locale);

  HlBuf b;
  hl_buf_init (&b);
  size_t rows = 1 + plan->n_options;
  hl_buf_puts (&b, HL_SWEEP_CSV_HEADER "\n");
  for (size_t step = 0; step < spec->n_steps; step++)
    for (size_t row = 0; row < rows; row++)
      {
        const HlResult *r = &results[row * spec->n_steps + step];
        bool ok = status == NULL || status[row * spec->n_steps + step] == HL_OK;
        char num[64];
        char flags[256];

        hl_buf_puts (&b, info->key);
        snprintf (num, sizeof num, ",%.6g,", values[step]);
        hl_buf_puts (&b, num);
        hl_buf_csv_field (&b, row == 0 ? "native" : plan->options[row - 1].name);
        double cols[] = {
          r->abductor_arm_mm, r->bw_arm_mm, r->lever_ratio, r->abductor_force_n,
          r->abductor_force_bw, r->jrf_n, r->jrf_bw, hl_result_jrf_angle_deg (r),
          r->global_offset_change_mm, r->leg_length_change_mm,
          r->abductor_length_change_mm,
        };
        for (size_t c = 0; c < sizeof cols / sizeof cols[0]; c++)
          csv_number (&b, ok ? cols[c] : NAN, c == 2 ? HL_CSV_RATIO_PRECISION
                                                     : HL_CSV_PRECISION);
        hl_buf_puts (&b, ",");
        if (ok)
          hl_buf_csv_field (&b, hl_flags_format (r->flags, ";", flags, sizeof flags));
        else
          hl_buf_puts (&b, "not-solved");
        hl_buf_puts (&b, "\n");
      }

  uselocale (old);
  freelocale (c_locale);
  if (b.failed)
    {
      free (b.data);
      return hl_error_set (err, HL_ERR_NOMEM, "sweep", "%s",
                           _("There is not enough memory for the table."));
    }
  *out = b.data;
  *size = b.len;
  return HL_OK;
}

HlStatus
hl_chart_data_to_csv (const HlChartData *d, const HlPlan *plan, char **out,
                      size_t *size, HlError *err)
{
  if (plan->n_options + 1 != d->n_rows)
    return hl_error_set (err, HL_ERR_INVALID, "chart",
                         _("The chart has %zu rows; the plan has %zu options."),
                         d->n_rows, plan->n_options);
  return hl_sweep_to_csv (plan, &d->spec, d->x, d->results, d->status, out, size, err);
}

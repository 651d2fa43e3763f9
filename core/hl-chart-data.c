/* hl-chart-data.c: the numbers of the charts (curves, current settings,
 * Monte Carlo bands) and their CSV; render/hl-chart.c draws them.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-chart-data.h"
#include "hl-text.h"
#include "hl-i18n.h"
#include "hl-result-fields.h"

/* Each end of a chart's range reaches this far past the plan's own
 * settings, so that a current mark never sits on the frame. */
#define HL_CHART_RANGE_MARGIN 0.15
/* Y ranges are padded by this share of their span; a flat curve gets
 * this much room in its own unit. */
#define HL_CHART_Y_PAD 0.06
#define HL_CHART_Y_FLAT_SPAN 0.1

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

double
hl_chart_band_value (const HlMcSummary *s, HlChartQuantity quantity, int which)
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
HlPlan *
hl_chart_plan_at (const HlPlan *plan, HlChartKind kind, double x)
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

      HlPlan *p = hl_chart_plan_at (plan, d->kind, d->band_x[j]);
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
          double l = hl_chart_band_value (&d->bands[i], q, -1);
          double h = hl_chart_band_value (&d->bands[i], q, 1);
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

/* ---- CSV ------------------------------------------------------------------ */

static void
csv_number (GString *b, double v, int decimals)
{
  char num[HL_NUMBER_TEXT_SIZE];
  g_string_append_c (b, ',');
  g_string_append (b, hl_format_number (num, sizeof num, decimals, v));
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

  const HlResultField *fields[HL_RESULT_FIELD_MAX];
  const size_t n_fields = hl_result_fields_for (HL_OUT_CSV, fields);
  GString *b = g_string_new (HL_SWEEP_CSV_HEADER "\n");
  size_t rows = 1 + plan->n_options;
  for (size_t step = 0; step < spec->n_steps; step++)
    for (size_t row = 0; row < rows; row++)
      {
        const HlResult *r = &results[row * spec->n_steps + step];
        bool ok = status == NULL || status[row * spec->n_steps + step] == HL_OK;
        char num[HL_NUMBER_TEXT_SIZE];
        char flags[256];

        g_string_append (b, info->key);
        g_string_append_c (b, ',');
        g_string_append (b, hl_format_number (num, sizeof num, HL_NUMBER_SIGNIFICANT (6),
                                              values[step]));
        g_string_append_c (b, ',');
        hl_csv_field_append (b, row == 0 ? "native" : plan->options[row - 1].name);
        for (size_t c = 0; c < n_fields; c++)
          csv_number (b, ok ? fields[c]->get (r) : NAN, fields[c]->csv_decimals);
        g_string_append_c (b, ',');
        if (ok)
          hl_csv_field_append (b, hl_flags_format (r->flags, ";", flags, sizeof flags));
        else
          g_string_append (b, "not-solved");
        g_string_append_c (b, '\n');
      }

  /* GLib allocates with the system malloc (since 2.46): the caller frees
   * the text with free(). */
  *size = b->len;
  *out = g_string_free (b, FALSE);
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


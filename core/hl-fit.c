/* hl-fit.c: ranking the implant combinations of a templated option.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The cup's size does not enter the geometry of templating.md section 2
 * (the rotation centre is C + l n whatever D is), so the mechanics are
 * solved once per liner x stem size x version x head length and shared by
 * the rows of every cup size.
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-fit.h"
#include "hl-i18n.h"
#include "hl-template.h"
#include "hl-uncertainty.h"

#define HL_FIT_HEADS_MAX 64
/* Rows per Monte Carlo run: 256 rows of 4,000 samples are 16 MB. */
#define HL_FIT_MC_CHUNK 256
/* Sample rows (samples times rows) of one chunk's workspace: 4,000,000 of
 * two doubles, 64 MB. */
#define HL_FIT_MC_SAMPLE_ROWS 4000000

long
hl_fit_first_templated (const HlPlan *plan)
{
  for (size_t i = 0; i < plan->n_options; i++)
    if (plan->options[i].recon.tmpl.on)
      return (long) i;
  return -1;
}

void
hl_fit_table_clear (HlFitTable *t)
{
  free (t->rows);
  memset (t, 0, sizeof *t);
}

typedef struct {
  HlFitRow row;
  double placed_cup;
  size_t order;
} SortRow;

static int
cmp_rows (const void *pa, const void *pb)
{
  const SortRow *a = pa, *b = pb;
  if (fabs (a->row.score_mm - b->row.score_mm) > HL_FIT_TIE_MM)
    return a->row.score_mm < b->row.score_mm ? -1 : 1;
  if (a->row.result.jrf_n != b->row.result.jrf_n)
    return a->row.result.jrf_n < b->row.result.jrf_n ? -1 : 1;
  /* equal mechanics (cup sizes): the size nearest the placed one first */
  double da = fabs (a->row.tmpl.cup_diameter_mm - a->placed_cup);
  double db = fabs (b->row.tmpl.cup_diameter_mm - b->placed_cup);
  if (da != db)
    return da < db ? -1 : 1;
  return a->order < b->order ? -1 : a->order > b->order;
}

HlStatus
hl_fit_rank (const HlPlan *plan, size_t option, const HlCatalogue *cat,
             unsigned flags, HlFitTable *out, HlError *err)
{
  memset (out, 0, sizeof *out);
  if (option >= plan->n_options)
    return hl_error_set (err, HL_ERR_INVALID, "option",
                         _("The plan has no option %zu"), option + 1);
  const HlOption *opt = &plan->options[option];
  const HlTemplate *placed = &opt->recon.tmpl;
  if (!placed->on)
    return hl_error_set (err, HL_ERR_INVALID, "option",
                         _("Option \"%s\" is not templated: it has no implants "
                           "to choose among"), opt->name);
  if (cat == NULL || strcmp (cat->id, placed->catalogue) != 0)
    return hl_error_set (err, HL_ERR_INVALID, "template catalogue",
                         _("Option \"%s\" uses the implant catalogue \"%s\", "
                           "which is not loaded"), opt->name, placed->catalogue);
  HlTemplate base = *placed;
  HlStatus st = hl_template_resolve (&base, cat, err);
  if (st != HL_OK)
    return st;

  HlModel model;
  if ((st = hl_model_prepare (&model, plan, err)) != HL_OK)
    return st;
  HlTemplateGeometry g;
  if ((st = hl_template_derive (&model.tframe, &base, &g, err)) != HL_OK)
    return st;

  const HlCupFamily *cf = hl_catalogue_cup_family (cat, base.cup_family);
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, base.stem_family);
  double heads[HL_FIT_HEADS_MAX];
  size_t n_heads = hl_catalogue_head_lengths (cat, heads, HL_FIT_HEADS_MAX);
  if (n_heads > HL_FIT_HEADS_MAX)
    n_heads = HL_FIT_HEADS_MAX;

  const bool sizes = (flags & HL_FIT_SIZES) != 0;
  const size_t n_cups = sizes ? cf->n_sizes : 1;
  const size_t n_stems = sizes ? sf->n_sizes : 1;
  const size_t n_mech = cf->n_liners * n_stems * sf->n_versions * n_heads;
  const size_t n_rows = n_mech * n_cups;

  HlOption *mech = calloc (n_mech, sizeof *mech);
  HlResult *res = calloc (n_mech, sizeof *res);
  HlMcSummary *mc = calloc (n_mech + 1, sizeof *mc);
  SortRow *rows = calloc (n_rows, sizeof *rows);
  if (mech == NULL || res == NULL || mc == NULL || rows == NULL)
    {
      st = hl_error_set (err, HL_ERR_NOMEM, "fit", _("out of memory"));
      goto done;
    }

  /* Solve each liner x stem size x version x head length. */
  size_t k = 0;
  for (size_t li = 0; li < cf->n_liners; li++)
    for (size_t si = 0; si < n_stems; si++)
      for (size_t vi = 0; vi < sf->n_versions; vi++)
        for (size_t hi = 0; hi < n_heads; hi++, k++)
          {
            HlTemplate t = base;
            snprintf (t.liner, sizeof t.liner, "%s", cf->liners[li].id);
            if (sizes)
              snprintf (t.stem_size, sizeof t.stem_size, "%s", sf->sizes[si].size);
            snprintf (t.version, sizeof t.version, "%s", sf->versions[vi].id);
            t.head_length_mm = heads[hi];
            HlRecon *rc = &mech[k].recon;
            *rc = opt->recon;
            rc->tmpl = t;
            snprintf (mech[k].name, sizeof mech[k].name, "%zu", k);
            if ((st = hl_template_resolve (&rc->tmpl, cat, err)) != HL_OK
                || (st = hl_template_derive (&model.tframe, &rc->tmpl, &g, err)) != HL_OK)
              goto done;
            hl_template_geometry_to_recon (&g, &rc->tmpl, rc);
            if ((st = hl_model_solve (&model, rc, &res[k], err)) != HL_OK)
              goto done;
          }

  /* Monte Carlo over the same combinations: the derived numbers are fixed
   * (the template is not perturbed), so the options go in untemplated. */
  size_t used = 0;
  if (!(flags & HL_FIT_NO_MC))
    {
      HlMcSettings s;
      hl_mc_settings_for_plan (plan, &s, NULL);
      /* In chunks: each sample draws its perturbation before it solves the
       * rows, so a row's percentiles do not depend on which rows share its
       * run, and the workspace stays small for a large catalogue. */
      size_t chunk = n_mech < HL_FIT_MC_CHUNK ? n_mech : HL_FIT_MC_CHUNK;
      /* and at most HL_FIT_MC_SAMPLE_ROWS sample rows: a plan of 200,000
       * samples ranks in 64 MB, not 500 */
      size_t fit_rows = s.n_samples > 0 ? HL_FIT_MC_SAMPLE_ROWS / s.n_samples : chunk + 1;
      if (fit_rows < 2)
        fit_rows = 2;
      if (chunk > fit_rows - 1)
        chunk = fit_rows - 1;
      HlOption *plain = malloc (n_mech * sizeof *plain);
      HlMcWorkspace *ws = plain ? hl_mc_workspace_new (s.n_samples, chunk) : NULL;
      if (ws == NULL)
        {
          free (plain);
          st = hl_error_set (err, HL_ERR_NOMEM, "fit", _("out of memory"));
          goto done;
        }
      for (size_t i = 0; i < n_mech; i++)
        {
          plain[i] = mech[i];
          plain[i].recon.tmpl.on = false;
        }
      HlMcInfo info = { 0 };
      HlMcSummary *part = malloc ((chunk + 1) * sizeof *part);
      st = part ? HL_OK : hl_error_set (err, HL_ERR_NOMEM, "fit", _("out of memory"));
      for (size_t first = 0; st == HL_OK && first < n_mech; first += chunk)
        {
          size_t n = n_mech - first < chunk ? n_mech - first : chunk;
          st = hl_mc_run (ws, &model, plain + first, n, &s, part, &info, err);
          if (st == HL_OK)
            memcpy (&mc[first + 1], &part[1], n * sizeof *part);
        }
      free (part);
      used = info.n_used;
      hl_mc_workspace_free (ws);
      free (plain);
      if (st != HL_OK)
        goto done;
    }

  size_t r = 0;
  for (size_t ci = 0; ci < n_cups; ci++)
    for (k = 0; k < n_mech; k++, r++)
      {
        SortRow *sr = &rows[r];
        HlFitRow *row = &sr->row;
        row->tmpl = mech[k].recon.tmpl;
        if (sizes)
          row->tmpl.cup_diameter_mm = cf->diameters_mm[ci];
        row->recon = mech[k].recon;
        row->recon.tmpl = row->tmpl;
        row->result = res[k];
        row->leg_length_residual_mm = model.lld_base + res[k].leg_length_change_mm;
        row->global_offset_residual_mm = res[k].global_offset_change_mm - model.go_drop_base;
        row->score_mm = fabs (row->leg_length_residual_mm)
                        + fabs (row->global_offset_residual_mm);
        row->jrf_p95_bw = (flags & HL_FIT_NO_MC) ? NAN : mc[k + 1].jrf_bw.p95;
        sr->placed_cup = base.cup_diameter_mm;
        sr->order = r;
      }
  qsort (rows, n_rows, sizeof *rows, cmp_rows);

  out->rows = malloc (n_rows * sizeof *out->rows);
  if (out->rows == NULL)
    {
      st = hl_error_set (err, HL_ERR_NOMEM, "fit", _("out of memory"));
      goto done;
    }
  for (size_t i = 0; i < n_rows; i++)
    {
      out->rows[i] = rows[i].row;
      out->rows[i].rank = i + 1;
    }
  out->n = n_rows;
  out->option = option;
  out->against_other_hip = isfinite (model.native_leg_length_difference_mm)
                           || (isfinite (model.other_global_offset_mm)
                               && isfinite (model.native_global_offset_mm));
  out->mc_samples_used = used;
  st = HL_OK;

done:
  free (mech);
  free (res);
  free (mc);
  free (rows);
  return st;
}

HlStatus
hl_fit_apply (HlPlan *plan, size_t option, const HlFitRow *row,
              const HlCatalogue *cat, HlError *err)
{
  return hl_plan_set_template (plan, option, &row->tmpl, cat, err);
}

/* hl-report-data.c: the content of the planning report (see the header).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Strings are GLib's (g_malloc through dup_printf below, GString): an
 * allocation that fails aborts by GLib's design; the arrays the core's
 * numerical work needs are checked.
 */
#include "config.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <glib.h>

#include "hl-capacity.h"
#include "hl-i18n.h"
#include "hl-image.h"
#include "hl-measure.h"
#include "hl-report-data.h"
#include "hl-result-fields.h"
#include "hl-version.h"

#define PERCENT 100.0
/* Changes against native smaller than this share are shown as 0.0%. */
#define CHANGE_EPS 1e-9
/* A per-cent change below this shows as +0.0%. */
#define PERCENT_ZERO 0.05

void
hl_report_settings_init (HlReportSettings *s)
{
  memset (s, 0, sizeof *s);
  s->date = NULL;
  s->target_jrf_bw = HL_REPORT_TARGET_JRF_BW_DEFAULT;
  s->uncertainty = true;
  s->figure_option = HL_REPORT_FIGURE_FIRST;
  s->underlay = true;
}

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* ---- Tables and lists ------------------------------------------------------ */

/* g_strdup_printf, measured first and allocated by g_malloc itself (GLib's
 * own goes through the C library's vasprintf). */
static char *
dup_vprintf (const char *fmt, va_list ap)
{
  /* Never NULL here; said so for GCC's format checks, which under the
   * sanitizers' -O2 build take an inlined caller's format for possibly NULL. */
  if (fmt == NULL)
    return g_strdup ("");
  va_list aq;
  va_copy (aq, ap);
  int n = vsnprintf (NULL, 0, fmt, aq);
  va_end (aq);
  if (n < 0)
    return g_strdup ("");
  char *s = g_malloc ((size_t) n + 1);
  vsnprintf (s, (size_t) n + 1, fmt, ap);
  return s;
}

static char *
dup_printf (const char *fmt, ...) G_GNUC_PRINTF (1, 2);

static char *
dup_printf (const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *s = dup_vprintf (fmt, ap);
  va_end (ap);
  return s;
}

static void
string_append_printf (GString *str, const char *fmt, ...) G_GNUC_PRINTF (2, 3);

static void
string_append_printf (GString *str, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *s = dup_vprintf (fmt, ap);
  va_end (ap);
  g_string_append (str, s);
  g_free (s);
}

static void
table_init (HlReportTable *t, int n_cols, int n_rows, int header_rows)
{
  t->n_cols = n_cols;
  t->n_rows = n_rows;
  t->header_rows = header_rows;
  t->cells = g_new0 (char *, (size_t) (n_cols * n_rows));
  t->numeric = g_new0 (bool, (size_t) n_cols);
  t->emphasis = g_new0 (bool, (size_t) n_rows);
}

static void
table_clear (HlReportTable *t)
{
  if (t->cells != NULL)
    for (int i = 0; i < t->n_cols * t->n_rows; i++)
      g_free (t->cells[i]);
  g_free (t->cells);
  g_free (t->numeric);
  g_free (t->emphasis);
  memset (t, 0, sizeof *t);
}

static void
cell_set (HlReportTable *t, int row, int col, const char *fmt, ...)
  G_GNUC_PRINTF (4, 5);

static void
cell_set (HlReportTable *t, int row, int col, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char **cell = &t->cells[row * t->n_cols + col];
  g_free (*cell);
  *cell = dup_vprintf (fmt, ap);
  va_end (ap);
}

const char *
hl_report_table_cell (const HlReportTable *t, int row, int col)
{
  if (t == NULL || t->cells == NULL || row < 0 || row >= t->n_rows || col < 0
      || col >= t->n_cols)
    return "";
  const char *c = t->cells[row * t->n_cols + col];
  return c != NULL ? c : "";
}

static void
lines_add (HlReportLines *l, char *owned)
{
  l->items = g_renew (char *, l->items, l->n + 1);
  l->items[l->n++] = owned;
}

static void
lines_clear (HlReportLines *l)
{
  for (size_t i = 0; i < l->n; i++)
    g_free (l->items[i]);
  g_free (l->items);
  memset (l, 0, sizeof *l);
}

/* ---- The computations ------------------------------------------------------- */

static bool
add_answer (HlReportData *d, size_t row, HlStatus st, const HlInverseAnswer *a)
{
  if (st != HL_OK && st != HL_ERR_NOT_REACHABLE && st != HL_ERR_NOT_CONVERGED)
    return false;
  char text[384];
  HlReportAnswer *ra = &d->answers[d->n_answers++];
  ra->row = row;
  ra->answer = *a;
  hl_inverse_answer_format (a, text, sizeof text);
  ra->text = g_strdup (text);
  return true;
}

/* Native: the cane, each hand's load and the lean; each option: the two
 * femoral offset questions, the cane and the lean. */
#define ANSWERS_NATIVE 4
#define ANSWERS_OPTION 4

static HlStatus
compute_answers (HlReportData *d, HlError *err)
{
  const HlPlan *p = d->plan;
  double target = d->settings.target_jrf_bw;

  d->answers = calloc (ANSWERS_NATIVE + ANSWERS_OPTION * p->n_options, sizeof *d->answers);
  if (d->answers == NULL)
    return hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                         _("There is not enough memory for the report."));
  for (size_t row = 0; row < d->n_cases; row++)
    {
      const HlRecon *recon = row == 0 ? NULL : &p->options[row - 1].recon;
      HlInverseAnswer a;
      HlError e;
      bool ok = true;   /* after a failure, e keeps its message */

      if (recon != NULL)
        {
          hl_error_clear (&e);
          ok = add_answer (d, row, hl_inverse_offset_for_arm (&d->model, recon, NULL,
                                                              &a, &e), &a);
          if (ok)
            hl_error_clear (&e);
          ok = ok && add_answer (d, row, hl_inverse_offset_for_global (&d->model, recon,
                                                                       NULL, &a, &e), &a);
        }
      if (ok)
        hl_error_clear (&e);
      ok = ok && add_answer (d, row, hl_inverse_cane_for_jrf (&d->model, recon, target,
                                                              p->cane.distance_mm, NULL,
                                                              &a, &e), &a);
      if (recon == NULL)
        for (int site = HL_LOAD_SITE_CONTRALATERAL; ok && site <= HL_LOAD_SITE_IPSILATERAL;
             site++)
          {
            hl_error_clear (&e);
            ok = add_answer (d, row, hl_inverse_load_for_jrf (&d->model, recon,
                                                              (HlLoadSite) site, target,
                                                              NULL, &a, &e), &a);
          }
      if (ok)
        hl_error_clear (&e);
      ok = ok && add_answer (d, row, hl_inverse_lean_for_capacity (&d->model, recon, NULL,
                                                                   &a, &e), &a);
      if (!ok)
        {
          if (err != NULL)
            *err = e;
          return e.status != HL_OK ? e.status : HL_ERR_INVALID;
        }
    }
  return HL_OK;
}

static HlStatus
compute_mc (HlReportData *d, HlError *err)
{
  const HlPlan *p = d->plan;
  hl_mc_settings_for_plan (p, &d->mc, &d->m_assumed);
  d->mc_summary = calloc (d->n_cases, sizeof *d->mc_summary);
  HlMcWorkspace *ws = hl_mc_workspace_new (d->mc.n_samples,
                                           p->n_options > 0 ? p->n_options : 1);
  HlStatus st;
  if (d->mc_summary == NULL || ws == NULL)
    st = hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                       _("There is not enough memory for the uncertainty samples."));
  else
    st = hl_mc_run (ws, &d->model, p->options, p->n_options, &d->mc, d->mc_summary,
                    &d->mc_info, err);
  hl_mc_workspace_free (ws);
  d->have_mc = st == HL_OK;
  return st;
}

static HlStatus
compute_charts (HlReportData *d, HlError *err)
{
  HlMcSettings band = {
    .seed = d->mc.seed,
    .n_samples = HL_CHART_BAND_SAMPLES_DEFAULT,
    .landmark_sd_mm = d->mc.landmark_sd_mm,
    .magnification_sd = d->mc.magnification_sd,
    .magnification = d->mc.magnification,
    .line_angle_sd_deg = d->mc.line_angle_sd_deg,
  };
  for (int k = 0; k < HL_CHART_N; k++)
    {
      d->charts[k] = hl_chart_data_new (d->plan, (HlChartKind) k, HL_REPORT_CHART_STEPS,
                                        HL_CHART_BAND_STEPS_DEFAULT,
                                        d->have_mc ? &band : NULL, err);
      if (d->charts[k] == NULL)
        return err != NULL && err->status != HL_OK ? err->status : HL_ERR_NOMEM;
    }
  return HL_OK;
}

/* ---- The text --------------------------------------------------------------- */

static const char *
hand_words (HlHand hand)
{
  return hand == HL_HAND_IPSILATERAL ? _("same-side hand") : _("opposite hand");
}

static void
build_heading (HlReportData *d)
{
  const HlPlan *p = d->plan;
  d->title = g_strdup (_("Hip biomechanics planning report: single-leg stance"));
  d->case_line = dup_printf (_("Case: %s"), p->label);
  d->meta_line = dup_printf (_("Operated side: %s  \xc2\xb7  body mass %.1f kg (body weight "
                                    "%.0f N)  \xc2\xb7  report date %s  \xc2\xb7  hiplever %s, "
                                    "mechanical model %s"),
                                  /* TRANSLATORS: the operated side */
                                  p->side == HL_SIDE_LEFT ? _("left")
                                                          : _("right"),
                                  p->mass_kg,
                                  hl_plan_body_weight (p), d->date, hl_program_version (),
                                  HL_MODEL_VERSION);
  d->caution_title = _("CAUTION: planning aid only");
  d->caution_text = hl_caution_text ();
  d->footer_caution = hl_caution_short ();
  d->footer_version = dup_printf (_("hiplever %s, mechanical model %s"),
                                       hl_program_version (), HL_MODEL_VERSION);
  d->continued = dup_printf (_("Case: %s (continued)"), p->label);
}

static void
build_inputs (HlReportData *d)
{
  const HlPlan *p = d->plan;
  const HlLimbTableInfo *limb = hl_limb_table_info (p->model.limb_table);
  HlReportLines *l = &d->inputs_left, *r = &d->inputs_right;

  d->inputs_heading = g_strdup (_("Inputs"));
  lines_add (l, dup_printf (_("Stance-limb mass fraction %.4f (%s)"),
                                 hl_plan_limb_fraction (p), limb != NULL ? _(limb->label) : ""));
  lines_add (l, dup_printf (_("Body-weight line: %s"),
                                 p->model.bw_line == HL_BW_LINE_SEGMENTAL
                                 ? _("segmental (whole-body centre of mass on the midline)")
                                 : _("on the midline (simplified)")));
  if (p->model.abductor_line == HL_ABDUCTOR_LINE_AUTO
      && hl_landmarks_has (&p->landmarks, HL_LM_ABDUCTOR_ORIGIN))
    lines_add (l, g_strdup (_("Abductor line: from the placed origin to the insertion")));
  else
    lines_add (l, dup_printf (_("Abductor line: %.1f deg to the horizontal through the "
                                     "insertion"), p->model.abductor_angle_deg));
  lines_add (l, dup_printf (_("Lateral trunk lean: %.1f mm towards the stance side"),
                                 p->model.lean_mm));
  double m = d->mc.magnification;
  bool assumed = d->m_assumed;
  if (!d->have_mc)
    hl_calibration_magnification (&p->calibration, &m, &assumed, NULL);
  if (p->radiograph.present)
    lines_add (l, dup_printf (_("Magnification %.3f; calibration: %s"), m,
                                   hl_cal_source_label (hl_image_calibration_source (p))));
  else
    lines_add (l, dup_printf (assumed
                                   ? _("Magnification %.3f (assumed: no usable calibration)")
                                   : _("Magnification %.3f (from the calibration)"), m));
  lines_add (l, dup_printf (_("Abductor capacity %.2f N m per kg (an assumption)"),
                                 p->capacity.torque_nm_per_kg));

  if (p->cane.enabled)
    lines_add (r, dup_printf (_("Cane: %.0f N (%.1f%% of body weight) in the %s, %.0f mm "
                                     "from the midline"),
                                   hl_plan_cane_force (p),
                                   PERCENT * hl_plan_cane_force (p) / hl_plan_body_weight (p),
                                   hand_words (p->cane.hand), p->cane.distance_mm));
  else
    lines_add (r, g_strdup (_("Cane: none")));
  for (int hand = 0; hand < 2; hand++)
    lines_add (r, dup_printf (_("Load in the %s: %.1f kg, %.0f mm from the midline"),
                                   hand_words ((HlHand) hand), p->loads.hand[hand].mass_kg,
                                   p->loads.hand[hand].distance_mm));
  lines_add (r, dup_printf (_("Load on the midline: %.1f kg"), p->loads.midline_kg));
  lines_add (r, dup_printf (_("Flag tolerances: global offset drop %.1f mm, leg length "
                                   "%.1f mm, abductor slackening %.1f mm"),
                                 p->tol.global_offset_drop_mm, p->tol.leg_length_mm,
                                 p->tol.abductor_slack_mm));
  lines_add (r, dup_printf (_("Uncertainty: %zu samples, seed %llu; SD landmark %.2g mm, "
                                   "magnification %.3g, line angle %.2g deg"),
                                 p->uncertainty.n_samples,
                                 (unsigned long long) p->uncertainty.seed,
                                 p->uncertainty.landmark_sd_mm, p->uncertainty.magnification_sd,
                                 p->uncertainty.line_angle_sd_deg));
}

static void
build_landmarks (HlReportData *d)
{
  const HlPlan *p = d->plan;
  HlReportTable *t = &d->landmarks;

  d->landmarks_caption = g_strdup (_("Landmarks, plan frame in true millimetres (x towards "
                                     "the patient's left, y superior)"));
  d->landmarks_note = g_strdup (_("* needed by the mechanics"));
  table_init (t, 3, 1 + HL_LM_COUNT, 1);
  t->numeric[1] = t->numeric[2] = true;
  cell_set (t, 0, 0, "%s", _("Landmark"));
  cell_set (t, 0, 1, "%s", _("x (mm)"));
  cell_set (t, 0, 2, "%s", _("y (mm)"));
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      int row = 1 + i;
      cell_set (t, row, 0, "%s%s", _(info->label), info->required ? " *" : "");
      if (hl_landmarks_has (&p->landmarks, (HlLandmarkId) i))
        {
          cell_set (t, row, 1, "%.1f", p->landmarks.p[i].x);
          cell_set (t, row, 2, "%.1f", p->landmarks.p[i].y);
        }
      else
        {
          cell_set (t, row, 1, "%s", _("not placed"));
          cell_set (t, row, 2, "%s", "");
        }
    }
}

static void
build_options (HlReportData *d)
{
  const HlPlan *p = d->plan;
  HlReportTable *t = &d->options;

  d->options_caption = g_strdup (_("Reconstruction options (changes against the native hip)"));
  if (p->n_options == 0)
    d->options_none = g_strdup (_("No options in this plan: the native hip only."));
  table_init (t, 7, 1 + (int) p->n_options, 1);
  const char *heads[7] = {
    _("Option"), _("Cup medialisation (mm, + medial)"), _("Cup height (mm, + superior)"),
    _("Femoral offset (mm, + lateral)"), _("Femoral length (mm, + longer)"),
    _("Head length (mm, + longer)"), _("Neck-shaft angle (deg)"),
  };
  for (int c = 0; c < 7; c++)
    {
      cell_set (t, 0, c, "%s", heads[c]);
      t->numeric[c] = c > 0;
    }
  for (size_t i = 0; i < p->n_options; i++)
    {
      const HlRecon *rc = &p->options[i].recon;
      int row = 1 + (int) i;
      cell_set (t, row, 0, "%s", p->options[i].name);
      cell_set (t, row, 1, "%+.1f", rc->cup_medial_mm);
      cell_set (t, row, 2, "%+.1f", rc->cup_superior_mm);
      cell_set (t, row, 3, "%+.1f", rc->femoral_offset_mm);
      cell_set (t, row, 4, "%+.1f", rc->femoral_length_mm);
      cell_set (t, row, 5, "%+.1f", rc->head_length_mm);
      cell_set (t, row, 6, "%.1f", rc->neck_shaft_angle_deg);
    }
}

/* The implants of the templated options, with the four numbers they make
 * (templating.md section 2). */
static void
build_implants (HlReportData *d)
{
  const HlPlan *p = d->plan;
  int n = 0;
  for (size_t i = 0; i < p->n_options; i++)
    n += p->options[i].recon.tmpl.on;
  if (n == 0)
    return;
  d->implants_caption = g_strdup (_("Implants of the templated options (catalogue as recorded "
                                    "in the plan; sizes in mm)"));
  HlReportTable *t = &d->implants;
  table_init (t, 6, 1 + n, 1);
  const char *heads[6] = {
    _("Option"), _("Catalogue"), _("Cup: family, size, liner, inclination"),
    _("Stem: family, size, version, seat"), _("Head"),
    _("Derived: cup medialisation, cup height, femoral offset, femoral length (mm)"),
  };
  for (int c = 0; c < 6; c++)
    cell_set (t, 0, c, "%s", heads[c]);
  int row = 1;
  for (size_t i = 0; i < p->n_options; i++)
    {
      const HlRecon *rc = &p->options[i].recon;
      const HlTemplate *tm = &rc->tmpl;
      if (!tm->on)
        continue;
      const HlCatalogueRef *ref = NULL;
      for (size_t k = 0; k < p->n_catalogues; k++)
        if (strcmp (p->catalogues[k].id, tm->catalogue) == 0)
          ref = &p->catalogues[k];
      cell_set (t, row, 0, "%s", p->options[i].name);
      cell_set (t, row, 1, "%s %s%s", tm->catalogue, ref != NULL ? _("version ") : "",
                ref != NULL ? ref->version : "");
      cell_set (t, row, 2, "%s, %.0f, %s, %.1f\xc2\xb0", tm->cup_family, tm->cup_diameter_mm,
                tm->liner, tm->inclination_deg);
      cell_set (t, row, 3, "%s, %s, %s, %+.1f mm", tm->stem_family, tm->stem_size,
                tm->version, tm->seat_mm);
      cell_set (t, row, 4, "%+.0f mm", tm->head_length_mm);
      cell_set (t, row, 5, "%+.1f, %+.1f, %+.1f, %+.1f%s", rc->cup_medial_mm,
                rc->cup_superior_mm, rc->femoral_offset_mm, rc->femoral_length_mm,
                tm->resolved ? "" : _(" (as saved: catalogue not at hand or changed)"));
      row++;
    }
}

/* Leg length and global offset against the other hip, in the words of the
 * results view and the command line (core/hl-measure.c), for native and
 * every option. */
static void
build_against (HlReportData *d)
{
  const HlPlan *p = d->plan;
  bool any = false;
  d->against_heading = g_strdup (_("Leg length and offset against the other hip"));
  for (size_t row = 0; row < d->n_cases; row++)
    {
      HlMeasures ms;
      char leg[160], go[160];
      hl_row_measures (p, row, &ms);
      any |= isfinite (ms.leg_length_difference_mm)
             || isfinite (ms.global_offset_difference_mm);
      lines_add (&d->against, dup_printf (
        /* TRANSLATORS: a case's name, then the two comparisons with the other hip */
        _("%s: %s; %s."), d->case_names[row],
        hl_measure_leg_length_words (ms.leg_length_difference_mm, leg, sizeof leg),
        hl_measure_global_offset_words (ms.global_offset_difference_mm, go, sizeof go)));
    }
  if (!any)
    {
      /* The same "not measured" sentence for every case says it once. */
      HlMeasures ms;
      char leg[160], go[160];
      hl_measure (&p->landmarks, p->side, &ms);
      lines_clear (&d->against);
      lines_add (&d->against, dup_printf (
        "%s; %s.",
        hl_measure_leg_length_words (ms.leg_length_difference_mm, leg, sizeof leg),
        hl_measure_global_offset_words (ms.global_offset_difference_mm, go, sizeof go)));
      d->against.items[0][0] = g_ascii_toupper (d->against.items[0][0]);
    }
}

static void
build_results (HlReportData *d)
{
  const HlResultField *rows[HL_RESULT_FIELD_MAX];
  const int n_plain = (int) hl_result_fields_for (HL_OUT_REPORT, rows);
  const int n_mc = d->have_mc ? 3 : 0;
  const int n_cols = 1 + (int) d->n_cases;
  HlReportTable *t = &d->results_table;

  d->results_heading = g_strdup (_("Results: native hip and options (change against native)"));
  table_init (t, n_cols, 1 + n_plain + n_mc, 1);
  for (int c = 1; c < n_cols; c++)
    t->numeric[c] = true;
  cell_set (t, 0, 0, "%s", _("Quantity"));
  for (size_t row = 0; row < d->n_cases; row++)
    cell_set (t, 0, 1 + (int) row, "%s", d->case_names[row]);

  for (int i = 0; i < n_plain; i++)
    {
      const HlResultField *rr = rows[i];
      double native = rr->get (&d->results[0]);
      /* the joint force in body weights, the headline */
      t->emphasis[1 + i] = strcmp (rr->key, "joint-reaction-force-bw") == 0;
      cell_set (t, 1 + i, 0, "%s", _(rr->label));
      for (size_t row = 0; row < d->n_cases; row++)
        {
          double v = rr->get (&d->results[row]);
          int c = 1 + (int) row;
          if (!isfinite (v))
            cell_set (t, 1 + i, c, "%s", _("not measured"));
          else if (row == 0 || rr->kind != HL_FIELD_PERCENT || fabs (native) < CHANGE_EPS)
            cell_set (t, 1 + i, c, rr->kind == HL_FIELD_CHANGE ? "%+.*f" : "%.*f",
                      rr->decimals, v);
          else
            {
              double pct = PERCENT * (v - native) / fabs (native);
              if (fabs (pct) < PERCENT_ZERO)
                pct = 0.0;
              cell_set (t, 1 + i, c, "%.*f (%+.1f%%)", rr->decimals, v, pct);
            }
        }
    }
  if (!d->have_mc)
    return;
  int base = 1 + n_plain;
  cell_set (t, base, 0, "%s", _("Joint force, 5-95% range (x body weight)"));
  cell_set (t, base + 1, 0, "%s", _("Abductor force, 5-95% range (x body weight)"));
  cell_set (t, base + 2, 0, "%s", _("Samples in which the option lowers the joint force "
                                    "against native"));
  for (size_t row = 0; row < d->n_cases; row++)
    {
      const HlMcSummary *m = &d->mc_summary[row];
      int c = 1 + (int) row;
      cell_set (t, base, c, _("%.2f to %.2f"), m->jrf_bw.p05, m->jrf_bw.p95);
      cell_set (t, base + 1, c, _("%.2f to %.2f"), m->abductor_force_bw.p05,
                m->abductor_force_bw.p95);
      if (row == 0 || !isfinite (m->share_lower_jrf))
        cell_set (t, base + 2, c, "%s", row == 0 ? _("(reference)") : "");
      else
        cell_set (t, base + 2, c, "%.0f%%", PERCENT * m->share_lower_jrf);
    }
  d->mc_note = dup_printf (
    _("Ranges: Monte Carlo with %zu samples used (%zu dropped), seed %llu; landmark "
      "placement SD %.2g mm per coordinate, magnification SD %.3g about M = %.3f, "
      "abductor line angle SD %.2g deg; native and options share each sample. "
      "Percentiles by definition 7 of Hyndman & Fan 1996. The ranges cover these "
      "input errors only, not the error of the model itself."),
    d->mc_info.n_used, d->mc_info.n_dropped, (unsigned long long) d->mc_info.seed,
    d->mc.landmark_sd_mm, d->mc.magnification_sd, d->mc.magnification,
    d->mc.line_angle_sd_deg);
}

static void
build_flags (HlReportData *d)
{
  d->flags_heading = g_strdup (_("Flags in plain words"));
  for (size_t row = 0; row < d->n_cases; row++)
    {
      const HlResult *res = &d->results[row];
      GString *line = g_string_new (NULL);
      string_append_printf (line, "%s: ", d->case_names[row]);
      if (res->flags == 0)
        g_string_append (line, _("none."));
      bool first = true;
      for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
        {
          if ((res->flags & bit) == 0)
            continue;
          if (!first)
            g_string_append (line, "; ");
          first = false;
          g_string_append (line, hl_flag_text ((HlFlag) bit));
          if (bit == HL_FLAG_IMPLAUSIBLE)
            {
              char why[4 * HL_ERROR_MESSAGE_MAX];
              hl_implausible_describe_all (res, " ", why, sizeof why);
              string_append_printf (line, ": %s", why);
            }
          if (bit == HL_FLAG_ABDUCTORS_NOT_NEEDED)
            string_append_printf (line, _(" (unbalanced moment %.2f N m)"),
                                    fabs (res->unbalanced_nmm) / 1000.0);
        }
      if (res->flags != 0)
        g_string_append_c (line, '.');
      lines_add (&d->flags, g_string_free (line, FALSE));
    }
  const char *cane_note = hl_plan_cane_note (d->plan);
  if (cane_note != NULL)
    lines_add (&d->flags, g_strdup (cane_note));
}

static void
build_capacity (HlReportData *d)
{
  const HlPlan *p = d->plan;
  GString *s = g_string_new (NULL);
  string_append_printf (s, _("Capacity use: an abductor torque capacity of %.2f N m per kg "
                               "(%.0f N m for %.1f kg) over the native moment arm of %.1f mm "
                               "gives %.0f N; the demand is "),
                          p->capacity.torque_nm_per_kg,
                          p->capacity.torque_nm_per_kg * p->mass_kg, p->mass_kg,
                          d->results[0].abductor_arm_mm, d->model.capacity_force_n);
  for (size_t row = 0; row < d->n_cases; row++)
    string_append_printf (s, "%s%.0f%% (%s)", row == 0 ? "" : ", ",
                            PERCENT * d->results[row].demand, d->case_names[row]);
  g_string_append (s, /* xgettext:no-c-format */
                   _(". Above 100% the pelvis cannot be held level in stance."));
  d->capacity_heading = g_strdup (_("Abductor capacity"));
  d->capacity_text = g_string_free (s, FALSE);
  d->capacity_note = hl_capacity_assumption_text ();
  d->inverse_heading = dup_printf (_("Inverse questions (joint-load target %.2f x body "
                                          "weight)"), d->settings.target_jrf_bw);
  d->inverse_caveat = hl_inverse_caveat ();
}

static void
build_page_two (HlReportData *d)
{
  const HlPlan *p = d->plan;
  if (d->figure_option >= 0)
    d->figure_heading = dup_printf (_("Schematic: option \"%s\" over the native hip "
                                           "(faint), forces to one scale"),
                                         p->options[d->figure_option].name);
  else
    d->figure_heading = g_strdup (_("Schematic: the native hip, forces to one scale"));
  d->charts_heading = g_strdup (_("Charts: joint force (left) and abductor force (right)"));

  d->assumptions_heading = g_strdup (_("Assumptions"));
  lines_add (&d->assumptions, g_strdup (_("A static posture in the frontal plane: single-leg "
                                          "stance, not walking, stairs or rising from a chair "
                                          "(free-body method after Pauwels).")));
  lines_add (&d->assumptions, g_strdup (_("Rigid segments and a frictionless hip joint: the "
                                          "joint force acts through the hip centre.")));
  lines_add (&d->assumptions, g_strdup (_("Muscles only pull; one resultant abductor line of "
                                          "action stands for the whole group; no antagonists, "
                                          "no co-contraction.")));
  lines_add (&d->assumptions, dup_printf (
    _("The superincumbent weight is body weight x (1 - %.4f), acting on the %s line; aids and "
      "loads are vertical forces at their distances from the midline."),
    hl_plan_limb_fraction (p),
    p->model.bw_line == HL_BW_LINE_SEGMENTAL ? _("segmental") : _("midline")));
  lines_add (&d->assumptions, g_strdup (_("Landmarks are at true size after the magnification "
                                          "correction; a reconstruction moves them rigidly "
                                          "with the pelvis or the femur.")));
  lines_add (&d->assumptions, g_strdup (_("The abductor capacity (N m per kg) is an assumption "
                                          "taken from young-adult figures, not measured in "
                                          "this patient.")));

  const HlLimbTableInfo *limb = hl_limb_table_info (p->model.limb_table);
  d->sources_heading = g_strdup (_("Sources"));
  const char *items[] = {
    _("Pauwels F 1976, Biomechanics of the Normal and Diseased Hip, Springer: the free-body "
      "method of single-leg stance."),
    NULL,   /* the limb table's own source */
    _("Kotzar GM et al. 1991, J Orthop Res 9:621-633, and Bergmann G et al. 2001, J Biomech "
      "34:859-871: joint loads measured in vivo, for comparison and the default target."),
    _("Brand RA, Crowninshield RD 1980, Clin Orthop 147:181-184; Neumann DA 1998, Phys Ther "
      "78:490-501: the cane."),
    _("Bergmann G, Graichen F, Rohlmann A 1997, Clin Orthop 335:190-201: loads carried in "
      "the hands."),
    _("Mahmood SS et al. 2016, Acta Orthop 87:36-41: the global offset flag (5 mm)."),
    _("Brew CJ et al. 2012, J Arthroplasty 27:643-647: the assumed magnification 1.20 and "
      "its spread."),
    _("Sugimoto D et al. 2014, Clin J Sport Med 24:422-428; Rasch A et al. 2010, Acta Orthop "
      "81:183-188: abductor capacity anchors."),
    _("Hyndman RJ, Fan Y 1996, Am Stat 50:361-365: percentiles. Okabe M, Ito K 2008, Color "
      "Universal Design: the colours."),
  };
  for (size_t i = 0; i < G_N_ELEMENTS (items); i++)
    lines_add (&d->sources, items[i] != NULL
                            ? g_strdup (items[i])
                            : dup_printf (_("Stance-limb mass fraction: %s."),
                                               limb != NULL ? limb->source : ""));
}

/* ---- Life cycle ------------------------------------------------------------- */

HlReportData *
hl_report_data_new (const HlPlan *plan, const HlReportSettings *settings, HlError *err)
{
  HlReportSettings defaults;
  if (settings == NULL)
    {
      hl_report_settings_init (&defaults);
      settings = &defaults;
    }
  if (!(settings->target_jrf_bw >= HL_REPORT_TARGET_JRF_BW_MIN
        && settings->target_jrf_bw <= HL_REPORT_TARGET_JRF_BW_MAX))
    {
      hl_error_set (err, HL_ERR_INVALID, "report target-jrf",
                    _("The joint-load target is %g x body weight: it must be between "
                      "%g and %g"), settings->target_jrf_bw,
                    HL_REPORT_TARGET_JRF_BW_MIN, HL_REPORT_TARGET_JRF_BW_MAX);
      return NULL;
    }

  double t0 = now_s ();
  HlReportData *d = calloc (1, sizeof *d);
  if (d == NULL || (d->plan = hl_plan_copy (plan)) == NULL)
    {
      free (d);
      hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                    _("There is not enough memory for the report."));
      return NULL;
    }
  d->settings = *settings;
  d->settings.date = NULL;
  if (settings->date != NULL)
    snprintf (d->date, sizeof d->date, "%s", settings->date);
  else
    {
      GDateTime *dt = g_date_time_new_now_utc ();
      gchar *text = dt != NULL ? g_date_time_format (dt, "%Y-%m-%d") : NULL;
      snprintf (d->date, sizeof d->date, "%s", text != NULL ? text : "?");
      g_free (text);
      if (dt != NULL)
        g_date_time_unref (dt);
    }
  d->n_cases = 1 + plan->n_options;
  d->case_names = g_new0 (char *, d->n_cases);
  d->case_names[0] = g_strdup (_("Native"));
  for (size_t i = 0; i < plan->n_options; i++)
    d->case_names[1 + i] = g_strdup (plan->options[i].name);
  int fo = settings->figure_option;
  if (fo == HL_REPORT_FIGURE_FIRST)
    fo = plan->n_options > 0 ? 0 : -1;
  d->figure_option = fo >= 0 && (size_t) fo < plan->n_options ? fo : -1;

  HlStatus st = hl_model_prepare (&d->model, d->plan, err);
  if (st == HL_OK)
    {
      d->results = calloc (d->n_cases, sizeof *d->results);
      st = d->results == NULL
           ? hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                           _("There is not enough memory for the report."))
           : hl_plan_solve_all (d->plan, d->results, err);
    }
  if (st == HL_OK && settings->uncertainty)
    st = compute_mc (d, err);
  if (st == HL_OK)
    st = compute_answers (d, err);
  if (st == HL_OK)
    st = compute_charts (d, err);
  if (st != HL_OK)
    {
      hl_report_data_free (d);
      return NULL;
    }

  build_heading (d);
  build_inputs (d);
  build_landmarks (d);
  build_options (d);
  build_implants (d);
  build_against (d);
  build_results (d);
  build_flags (d);
  build_capacity (d);
  build_page_two (d);
  d->compute_s = now_s () - t0;
  return d;
}

void
hl_report_data_free (HlReportData *d)
{
  if (d == NULL)
    return;
  for (int k = 0; k < HL_CHART_N; k++)
    hl_chart_data_free (d->charts[k]);
  for (size_t i = 0; i < d->n_answers; i++)
    g_free (d->answers[i].text);
  free (d->answers);
  free (d->mc_summary);
  free (d->results);
  if (d->case_names != NULL)
    for (size_t i = 0; i < d->n_cases; i++)
      g_free (d->case_names[i]);
  g_free (d->case_names);
  char *strings[] = {
    d->title, d->case_line, d->meta_line, d->inputs_heading, d->landmarks_caption,
    d->landmarks_note, d->options_caption, d->options_none, d->implants_caption,
    d->against_heading, d->results_heading, d->mc_note, d->flags_heading,
    d->capacity_heading, d->capacity_text, d->inverse_heading, d->figure_heading,
    d->charts_heading, d->assumptions_heading, d->sources_heading, d->footer_version,
    d->continued,
  };
  for (size_t i = 0; i < G_N_ELEMENTS (strings); i++)
    g_free (strings[i]);
  HlReportLines *lists[] = {
    &d->inputs_left, &d->inputs_right, &d->against, &d->flags, &d->assumptions, &d->sources,
  };
  for (size_t i = 0; i < G_N_ELEMENTS (lists); i++)
    lines_clear (lists[i]);
  HlReportTable *tables[] = { &d->landmarks, &d->options, &d->implants, &d->results_table };
  for (size_t i = 0; i < G_N_ELEMENTS (tables); i++)
    table_clear (tables[i]);
  hl_plan_free (d->plan);
  free (d);
}

/* ---- The sweeps as one table ------------------------------------------------ */

HlStatus
hl_report_data_sweeps_csv (const HlReportData *d, char **out, size_t *size, HlError *err)
{
  char *all = NULL;
  size_t all_len = 0;

  for (int k = 0; k < HL_CHART_N; k++)
    {
      char *csv = NULL;
      size_t len = 0;
      HlStatus st = hl_chart_data_to_csv (d->charts[k], d->plan, &csv, &len, err);
      if (st != HL_OK)
        {
          free (all);
          return st;
        }
      /* Every table but the first without its header line. */
      const char *body = csv;
      if (k > 0)
        {
          const char *nl = strchr (csv, '\n');
          body = nl != NULL ? nl + 1 : csv + len;
        }
      size_t blen = len - (size_t) (body - csv);
      char *grown = realloc (all, all_len + blen + 1);
      if (grown == NULL)
        {
          free (csv);
          free (all);
          return hl_error_set (err, HL_ERR_NOMEM, "sweep", "%s",
                               _("There is not enough memory for the table."));
        }
      all = grown;
      memcpy (all + all_len, body, blen);
      all_len += blen;
      all[all_len] = '\0';
      free (csv);
    }
  *out = all;
  *size = all_len;
  return HL_OK;
}

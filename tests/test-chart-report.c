/* test-chart-report.c: charts, the PDF report and figures (cairo, no display).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The charts and the report must show what the core computes: their
 * numbers are checked against hl_model_solve of edited plans, not against
 * an outside source, so no source is cited.  The drawings are checked for
 * ink, colours and sizes; every error path is provoked.  The report loses
 * nothing: the text of its PDF (pdftotext, poppler-utils) holds every cell
 * of every table and every line the core made, with 1, 4 and 8 options.
 */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include <glib.h>
#include <glib/gstdio.h>

#include "hl-chart.h"
#include "hl-measure.h"
#include "hl-plan-io.h"
#include "hl-report.h"
#include "hl-solve.h"
#include "hl-uncertainty.h"
#include "hl-test-util.h"

#define CHART_W 640
#define CHART_H 400
#define STEPS 41
#define BAND_STEPS 5
#define BAND_SAMPLES 300
/* The chart's numbers are the core's: the same solve, the same bits but
 * for the sweep's own arithmetic on the parameter. */
#define TOL_SAME 1e-9
/* A drawn chart covers more than this share of its picture with ink. */
#define MIN_INK_SHARE 0.02
/* A pixel this far from the background (0..255, any channel) is ink. */
#define INK_TOL 40
/* Pixels of a series colour that count as "drawn". */
#define MIN_COLOUR_PIXELS 30
#define CHANNEL_TOL 30
/* A report page has ink on more than this share of it. */
#define MIN_PAGE_INK_SHARE 0.03
#define PAGE_SCALE 1.0
/* Printed, not asserted: the target is 1 s on an ordinary machine. */
#define REPORT_TARGET_S 1.0
#define MANY_OPTIONS 9
#define FIG_W 321
#define FIG_H 307

static HlPlan *
demo_plan (void)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  plan->cane.enabled = true;
  plan->cane.unit = HL_FORCE_UNIT_N;
  plan->cane.value = 73.25;
  plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = 3.75;
  plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = 1.5;
  HlRecon r;
  hl_recon_init (&r);
  r.femoral_offset_mm = 6.25;
  ck_assert_int_ge (hl_plan_add_option (plan, "Lateral offset stem", &r), 0);
  hl_recon_init (&r);
  r.cup_medial_mm = 4.5;
  r.cup_superior_mm = 2.75;
  r.head_length_mm = 3.5;
  r.femoral_offset_mm = -2.5;
  ck_assert_int_ge (hl_plan_add_option (plan, "Medialised cup, long head", &r), 0);
  return plan;
}

static HlMcSettings
band_settings (const HlPlan *plan)
{
  HlMcSettings mc;
  hl_mc_settings_for_plan (plan, &mc, NULL);
  mc.n_samples = BAND_SAMPLES;
  return mc;
}

static void
assert_same_result (const HlResult *a, const HlResult *b, const char *what)
{
  ck_assert_msg (fabs (a->jrf_bw - b->jrf_bw) <= TOL_SAME, "%s: joint force %.12g vs %.12g",
                 what, a->jrf_bw, b->jrf_bw);
  ck_assert_msg (fabs (a->abductor_force_bw - b->abductor_force_bw) <= TOL_SAME,
                 "%s: abductor force %.12g vs %.12g", what, a->abductor_force_bw,
                 b->abductor_force_bw);
}

/* ---- chart data against the core -------------------------------------------- */

static const struct {
  HlChartKind kind;
  const char *param_key;
  bool one_setting;   /* one current x for every row */
} chart_cases[] = {
  { HL_CHART_FEMORAL_OFFSET, "femoral_offset_mm", false },
  { HL_CHART_CANE_FORCE, "cane_force_n", true },
  { HL_CHART_LOAD_CONTRA, "load_contra_kg", true },
  { HL_CHART_LOAD_IPSI, "load_ipsi_kg", true },
};

START_TEST (test_chart_data_is_the_core)
{
  HlPlan *plan = demo_plan ();
  HlMcSettings mc = band_settings (plan);
  HlError err;
  HlChartKind kind = chart_cases[_i].kind;

  hl_error_clear (&err);
  HlChartData *d = hl_chart_data_new (plan, kind, STEPS, BAND_STEPS, &mc, &err);
  ck_assert_msg (d != NULL, "chart %d: %s", (int) kind, err.message);
  ck_assert_str_eq (hl_sweep_param_info (d->spec.param)->key, chart_cases[_i].param_key);
  ck_assert_uint_eq (d->n_rows, 1 + plan->n_options);
  ck_assert_double_eq (d->x[0], d->spec.from);
  ck_assert_double_eq (d->x[STEPS - 1], d->spec.to);
  ck_assert_str_eq (d->names[1], "Lateral offset stem");

  /* Both ends of every curve are the forward solve of the edited plan. */
  const size_t ends[2] = { 0, STEPS - 1 };
  for (int e = 0; e < 2; e++)
    {
      /* the plan as the chart means it at that x (the core's own
       * hl_chart_plan_at, which the bands also use), solved forward */
      HlPlan *p = hl_chart_plan_at (plan, kind, d->x[ends[e]]);
      ck_assert_ptr_nonnull (p);
      HlResult *want = calloc (d->n_rows, sizeof *want);
      ck_assert_int_eq (hl_plan_solve_all (p, want, &err), HL_OK);
      for (size_t row = 0; row < d->n_rows; row++)
        {
          ck_assert_int_eq (d->status[row * STEPS + ends[e]], HL_OK);
          assert_same_result (&d->results[row * STEPS + ends[e]], &want[row], "curve end");
        }
      free (want);
      hl_plan_free (p);
    }

  /* The marks are the plan's own settings and results, inside the range. */
  HlResult *now = calloc (d->n_rows, sizeof *now);
  ck_assert_int_eq (hl_plan_solve_all (plan, now, &err), HL_OK);
  for (size_t row = 0; row < d->n_rows; row++)
    {
      bool expect = chart_cases[_i].one_setting || row > 0;
      ck_assert_int_eq (d->current_valid[row], expect);
      if (!expect)
        continue;
      assert_same_result (&d->current[row], &now[row], "current setting");
      ck_assert (d->current_x[row] >= d->spec.from && d->current_x[row] <= d->spec.to);
    }
  if (kind == HL_CHART_FEMORAL_OFFSET)
    ck_assert_double_eq (d->current_x[2], -2.5);
  free (now);

  /* Bands: ordered percentiles at every point, a real spread at the first
   * (where the abductors are needed, the joint force depends on the
   * geometry; where they are not, it is the sum of the vertical forces). */
  ck_assert_uint_eq (d->n_band_steps, BAND_STEPS);
  for (size_t i = 0; i < d->n_rows * BAND_STEPS; i++)
    {
      ck_assert (d->band_valid[i]);
      const HlPercentiles *j = &d->bands[i].jrf_bw;
      ck_assert (j->p05 <= j->p50 && j->p50 <= j->p95);
      if (i % BAND_STEPS == 0)
        ck_assert (j->p05 < j->p95);
    }

  double lo, hi;
  for (int q = 0; q < HL_CHART_QUANTITY_N; q++)
    {
      ck_assert (hl_chart_y_range (d, (HlChartQuantity) q, true, &lo, &hi));
      ck_assert (lo < hi);
      for (size_t i = 0; i < d->n_rows * STEPS; i++)
        {
          double v = hl_chart_value (&d->results[i], (HlChartQuantity) q);
          ck_assert (v >= lo && v <= hi);
        }
    }
  hl_chart_data_free (d);
  hl_plan_free (plan);
}
END_TEST

/* ---- drawing ------------------------------------------------------------------ */

static double
ink_share (cairo_surface_t *s, HlRgba bg)
{
  cairo_surface_flush (s);
  const unsigned char *px = cairo_image_surface_get_data (s);
  int w = cairo_image_surface_get_width (s), h = cairo_image_surface_get_height (s);
  int stride = cairo_image_surface_get_stride (s);
  long ink = 0;
  for (int y = 0; y < h; y++)
    for (int x = 0; x < w; x++)
      {
        const unsigned char *p = px + y * stride + 4 * x;
        int r = p[2], g = p[1], b = p[0];
        if (abs (r - (int) (bg.r * 255)) > INK_TOL || abs (g - (int) (bg.g * 255)) > INK_TOL
            || abs (b - (int) (bg.b * 255)) > INK_TOL)
          ink++;
      }
  return (double) ink / ((double) w * h);
}

static long
colour_pixels (cairo_surface_t *s, HlRgba c)
{
  const unsigned char *px = cairo_image_surface_get_data (s);
  int w = cairo_image_surface_get_width (s), h = cairo_image_surface_get_height (s);
  int stride = cairo_image_surface_get_stride (s);
  long n = 0;
  for (int y = 0; y < h; y++)
    for (int x = 0; x < w; x++)
      {
        const unsigned char *p = px + y * stride + 4 * x;
        if (abs (p[2] - (int) (c.r * 255)) <= CHANNEL_TOL
            && abs (p[1] - (int) (c.g * 255)) <= CHANNEL_TOL
            && abs (p[0] - (int) (c.b * 255)) <= CHANNEL_TOL)
          n++;
      }
  return n;
}

/* Every chart and quantity, light and dark, with and without bands. */
START_TEST (test_chart_draw)
{
  HlChartKind kind = (HlChartKind) (_i / 4);
  HlChartQuantity q = (HlChartQuantity) ((_i / 2) % 2);
  bool dark = _i % 2 == 1;
  HlPlan *plan = demo_plan ();
  HlMcSettings mc = band_settings (plan);
  HlError err;
  HlChartData *d = hl_chart_data_new (plan, kind, STEPS, BAND_STEPS, &mc, &err);
  ck_assert_ptr_nonnull (d);

  HlChartStyle style;
  hl_chart_style_init (&style, dark);
  style.show_bands = !dark;
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, CHART_W, CHART_H);
  cairo_t *cr = cairo_create (s);
  hl_chart_draw (cr, d, q, &style, 0, 0, CHART_W, CHART_H);
  cairo_destroy (cr);

  double share = ink_share (s, style.bg);
  ck_assert_msg (share > MIN_INK_SHARE, "chart %d/%d %s: ink %.4f", (int) kind, (int) q,
                 dark ? "dark" : "light", share);
  long n = colour_pixels (s, hl_chart_series_color (1, dark));
  ck_assert_msg (n > MIN_COLOUR_PIXELS, "the first option's colour: %ld pixels", n);
  n = colour_pixels (s, hl_chart_series_color (2, dark));
  ck_assert_msg (n > MIN_COLOUR_PIXELS, "the second option's colour: %ld pixels", n);
  cairo_surface_destroy (s);
  hl_chart_data_free (d);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_chart_series_styles)
{
  /* Colour is never the only cue: native solid, every option dashed, and
   * neighbours in different colours and dash patterns. */
  double a[HL_PALETTE_DASHES_MAX], b[HL_PALETTE_DASHES_MAX];
  ck_assert_int_eq (hl_chart_series_dashes (0, a), 0);
  for (size_t row = 1; row < 8; row++)
    {
      int na = hl_chart_series_dashes (row, a);
      int nb = hl_chart_series_dashes (row + 1, b);
      ck_assert_int_gt (na, 0);
      ck_assert (na != nb || memcmp (a, b, sizeof (double) * (size_t) na) != 0);
      HlRgba ca = hl_chart_series_color (row, false), cb = hl_chart_series_color (row + 1, false);
      ck_assert (ca.r != cb.r || ca.g != cb.g || ca.b != cb.b);
    }
}
END_TEST

/* ---- errors --------------------------------------------------------------------- */

START_TEST (test_chart_errors)
{
  HlPlan *plan = demo_plan ();
  HlMcSettings mc = band_settings (plan);
  HlError err;

  hl_error_clear (&err);
  ck_assert_ptr_null (hl_chart_data_new (plan, HL_CHART_N, STEPS, 0, NULL, &err));
  ck_assert_int_eq (err.status, HL_ERR_INVALID);
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_chart_data_new (plan, HL_CHART_CANE_FORCE, 1, 0, NULL, &err));
  ck_assert_int_eq (err.status, HL_ERR_INVALID);
  ck_assert_str_eq (err.field, "chart steps");
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_chart_data_new (plan, HL_CHART_CANE_FORCE, STEPS, 1, &mc, &err));
  ck_assert_str_eq (err.field, "chart band steps");

  /* A midline on the operated side: the core's reason comes back. */
  plan->landmarks.p[HL_LM_MIDLINE].x = plan->landmarks.p[HL_LM_HIP_CENTRE].x - 50.0;
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_chart_data_new (plan, HL_CHART_CANE_FORCE, STEPS, 0, NULL, &err));
  ck_assert_int_ne (err.status, HL_OK);
  ck_assert_msg (strstr (err.field, "midline") != NULL, "field '%s'", err.field);
  hl_error_clear (&err);
  ck_assert_ptr_null (hl_report_new (plan, NULL, &err));
  ck_assert_int_ne (err.status, HL_OK);

  unsigned char *out = NULL;
  size_t size = 0;
  hl_error_clear (&err);
  ck_assert_int_ne (hl_figure_to_buffer (plan, -1, FIG_W, FIG_H, HL_FIGURE_FORMAT_PNG, &out,
                                         &size, &err), HL_OK);
  ck_assert_ptr_null (out);

  /* Drawing no data says so instead of crashing. */
  HlChartStyle style;
  hl_chart_style_init (&style, false);
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, CHART_W, CHART_H);
  cairo_t *cr = cairo_create (s);
  hl_chart_draw (cr, NULL, HL_CHART_JRF, &style, 0, 0, CHART_W, CHART_H);
  cairo_destroy (cr);
  ck_assert (ink_share (s, style.bg) > 0.0);
  cairo_surface_destroy (s);
  hl_plan_free (plan);
}
END_TEST

/* ---- CSV -------------------------------------------------------------------------- */

START_TEST (test_csv)
{
  HlPlan *plan = demo_plan ();
  HlError err;
  HlChartData *d = hl_chart_data_new (plan, HL_CHART_LOAD_IPSI, STEPS, 0, NULL, &err);
  ck_assert_ptr_nonnull (d);
  char *csv = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_chart_data_to_csv (d, plan, &csv, &size, &err), HL_OK);
  ck_assert_uint_eq (strlen (csv), size);
  ck_assert (strncmp (csv, HL_SWEEP_CSV_HEADER "\n", strlen (HL_SWEEP_CSV_HEADER) + 1) == 0);
  ck_assert_uint_eq (hl_test_count_lines (csv), 1 + STEPS * d->n_rows);
  /* A comma in an option name is quoted. */
  ck_assert_ptr_nonnull (strstr (csv, ",\"Medialised cup, long head\","));
  free (csv);

  /* A chart of another plan is refused. */
  HlPlan *other = hl_plan_new ();
  hl_plan_set_demo_landmarks (other);
  ck_assert_int_eq (hl_chart_data_to_csv (d, other, &csv, &size, &err), HL_ERR_INVALID);
  hl_plan_free (other);
  hl_chart_data_free (d);

  HlReport *r = hl_report_new (plan, NULL, &err);
  ck_assert_ptr_nonnull (r);
  ck_assert_int_eq (hl_report_sweeps_csv (r, &csv, &size, &err), HL_OK);
  ck_assert_ptr_null (strstr (csv + 1, HL_SWEEP_CSV_HEADER));
  ck_assert_ptr_nonnull (strstr (csv, "\ncane_force_n,"));
  ck_assert_ptr_nonnull (strstr (csv, "\nload_contra_kg,"));
  free (csv);
  hl_report_free (r);
  hl_plan_free (plan);
}
END_TEST

/* ---- the report --------------------------------------------------------------------- */

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* The demo plan with this many options (0, 2, many). */
static const size_t report_option_counts[] = { 0, 2, MANY_OPTIONS };

START_TEST (test_report)
{
  HlPlan *plan = demo_plan ();
  size_t want = report_option_counts[_i];
  while (plan->n_options > want)
    hl_plan_remove_option (plan, plan->n_options - 1);
  while (plan->n_options < want)
    {
      HlRecon r;
      char name[HL_NAME_MAX];
      hl_recon_init (&r);
      r.femoral_offset_mm = 1.25 * (double) plan->n_options;
      snprintf (name, sizeof name, "Option %zu", plan->n_options + 1);
      ck_assert_int_ge (hl_plan_add_option (plan, name, &r), 0);
    }

  HlReportSettings settings;
  hl_report_settings_init (&settings);
  settings.date = "2026-03-01";
  HlError err;
  hl_error_clear (&err);
  double t0 = now_s ();
  HlReport *r = hl_report_new (plan, &settings, &err);
  ck_assert_msg (r != NULL, "%s", err.message);
  unsigned char *pdf = NULL;
  size_t size = 0;
  ck_assert_int_eq (hl_report_pdf_to_buffer (r, &pdf, &size, &err), HL_OK);
  double t = now_s () - t0;
  printf ("report with %zu options: %.3f s (target <= %.1f s), %d pages\n", want, t,
          REPORT_TARGET_S, hl_report_n_pages (r));
  ck_assert (size > 5 && memcmp (pdf, "%PDF-", 5) == 0);
  ck_assert_int_ge (hl_report_n_pages (r), 1);
  ck_assert_int_ge (hl_report_n_pages (r), 2);
  free (pdf);

  /* Each page drawn on its own has ink; a page out of range draws nothing. */
  int w = (int) (HL_REPORT_PAGE_WIDTH_PT * PAGE_SCALE);
  int h = (int) (HL_REPORT_PAGE_HEIGHT_PT * PAGE_SCALE);
  HlRgba white = { 1, 1, 1, 1 };
  for (int page = -1; page <= hl_report_n_pages (r); page++)
    {
      cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (s);
      cairo_set_source_rgb (cr, 1, 1, 1);
      cairo_paint (cr);
      cairo_scale (cr, PAGE_SCALE, PAGE_SCALE);
      hl_report_draw_page (r, cr, page);
      cairo_destroy (cr);
      double share = ink_share (s, white);
      if (page < 0 || page >= hl_report_n_pages (r))
        ck_assert_msg (share == 0.0, "page %d out of range has ink %.4f", page, share);
      else
        ck_assert_msg (share > MIN_PAGE_INK_SHARE, "page %d: ink %.4f", page, share);
      /* The caution's frame is drawn in the palette's vermillion on page 1. */
      if (page == 0)
        ck_assert (colour_pixels (s, hl_palette_color (HL_ROLE_ERROR, false)) > MIN_COLOUR_PIXELS);
      cairo_surface_destroy (s);
    }
  hl_report_free (r);
  hl_plan_free (plan);
}
END_TEST

/* ---- the report loses nothing ----------------------------------------------------------- */

/* The demo plan with n options named "Option k". */
static HlPlan *
plan_with_options (size_t n)
{
  HlPlan *plan = demo_plan ();
  while (plan->n_options > 0)
    hl_plan_remove_option (plan, plan->n_options - 1);
  for (size_t i = 0; i < n; i++)
    {
      HlRecon r;
      char name[HL_NAME_MAX];
      hl_recon_init (&r);
      r.femoral_offset_mm = 1.25 * (double) i - 2.0;
      r.femoral_length_mm = 0.75 * (double) i - 1.5;
      r.cup_medial_mm = 0.5 * (double) i;
      snprintf (name, sizeof name, "Option %zu", i + 1);
      ck_assert_int_ge (hl_plan_add_option (plan, name, &r), 0);
    }
  return plan;
}

/* Runs of white space as one space, none at the ends. */
static char *
squeeze (const char *text)
{
  GString *out = g_string_new (NULL);
  bool space = false;
  for (const char *p = text; *p != '\0'; p++)
    {
      if (g_ascii_isspace (*p))
        {
          space = out->len > 0;
          continue;
        }
      if (space)
        g_string_append_c (out, ' ');
      space = false;
      g_string_append_c (out, *p);
    }
  return g_string_free (out, FALSE);
}

static void
assert_shown (const char *pdf_text, const char *what, const char *text)
{
  char *want = squeeze (text);
  ck_assert_msg (want[0] == '\0' || strstr (pdf_text, want) != NULL,
                 "%s not in the report: \"%s\"", what, want);
  g_free (want);
}

/* A table cell that wraps inside its column comes out of pdftotext with
 * the lines of the cells beside it in between: its words must appear in
 * order, each within CELL_WORD_GAP words of the one before. */
#define CELL_WORD_GAP 40

static bool
words_in_order (char **text, char **want, size_t from)
{
  if (want[0] == NULL)
    return true;
  for (size_t i = from; text[i] != NULL && i < from + CELL_WORD_GAP; i++)
    if (strcmp (text[i], want[0]) == 0 && words_in_order (text, want + 1, i + 1))
      return true;
  return false;
}

static void
assert_cell_shown (char **text_words, const char *what, const char *cell)
{
  char *squeezed = squeeze (cell);
  char **want = g_strsplit (squeezed, " ", -1);
  bool found = want[0] == NULL || want[0][0] == '\0';
  for (size_t i = 0; !found && text_words[i] != NULL; i++)
    found = strcmp (text_words[i], want[0]) == 0 && words_in_order (text_words, want + 1, i + 1);
  ck_assert_msg (found, "%s not in the report: \"%s\"", what, squeezed);
  g_strfreev (want);
  g_free (squeezed);
}

static void
assert_table_shown (const char *pdf_text, const char *what, const HlReportTable *t)
{
  char **words = g_strsplit (pdf_text, " ", -1);
  for (int row = 0; row < t->n_rows; row++)
    for (int col = 0; col < t->n_cols; col++)
      assert_cell_shown (words, what, hl_report_table_cell (t, row, col));
  g_strfreev (words);
}

static void
assert_lines_shown (const char *pdf_text, const char *what, const HlReportLines *l)
{
  for (size_t i = 0; i < l->n; i++)
    assert_shown (pdf_text, what, l->items[i]);
}

/* The report of `plan` on a fixed date (asserted to succeed). */
static HlReport *
dated_report (const HlPlan *plan)
{
  HlReportSettings settings;
  hl_report_settings_init (&settings);
  settings.date = "2026-03-01";
  HlError err;
  hl_error_clear (&err);
  HlReport *r = hl_report_new (plan, &settings, &err);
  ck_assert_msg (r != NULL, "%s", err.message);
  return r;
}

/* Option counts of the lost-content test. */
static const size_t lost_option_counts[] = { 1, 4, 8 };
/* Rows of pixels between the content's bottom and the footer rule. */
#define FOOTER_BAND_TOP 807
#define FOOTER_BAND_BOTTOM 810

START_TEST (test_report_loses_nothing)
{
  size_t n_options = lost_option_counts[_i];
  HlPlan *plan = plan_with_options (n_options);
  HlReport *r = dated_report (plan);
  const HlReportData *d = hl_report_data (r);
  int n_pages = hl_report_n_pages (r);

  /* Every option is in the content: nothing is cut before drawing. */
  ck_assert_uint_eq (d->n_cases, 1 + n_options);
  ck_assert_int_eq (d->options.n_rows, 1 + (int) n_options);
  ck_assert_int_eq (d->results_table.n_cols, 2 + (int) n_options);
  ck_assert_uint_eq (d->against.n, 1 + n_options);
  ck_assert_uint_eq (d->flags.n, 1 + n_options + (hl_plan_cane_note (plan) != NULL));

  /* Leg length and offset against the other hip: the core's own words,
   * those of the results view and the command line. */
  for (size_t row = 0; row <= n_options; row++)
    {
      HlLandmarks lm;
      HlMeasures ms;
      char leg[160], go[160];
      if (row == 0)
        lm = plan->landmarks;
      else
        hl_recon_landmarks (plan, &plan->options[row - 1].recon, &lm);
      hl_measure (&lm, plan->side, &ms);
      ck_assert (isfinite (ms.leg_length_difference_mm));
      char *want = g_strdup_printf ("%s: %s; %s.", row == 0 ? "Native" : plan->options[row - 1].name,
                                    hl_measure_leg_length_words (ms.leg_length_difference_mm,
                                                                 leg, sizeof leg),
                                    hl_measure_global_offset_words (ms.global_offset_difference_mm,
                                                                    go, sizeof go));
      ck_assert_str_eq (d->against.items[row], want);
      g_free (want);
    }

  /* The PDF's text holds all of it. */
  unsigned char *pdf = NULL;
  size_t size = 0;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_report_pdf_to_buffer (r, &pdf, &size, &err), HL_OK);
  char *dir = g_dir_make_tmp ("hl-test-report-XXXXXX", NULL);
  ck_assert_ptr_nonnull (dir);
  char *path = g_build_filename (dir, "report.pdf", NULL);
  ck_assert (g_file_set_contents (path, (const char *) pdf, (gssize) size, NULL));
  free (pdf);
  char *tool = g_find_program_in_path ("pdftotext");
  ck_assert_msg (tool != NULL, "pdftotext (poppler-utils, tests/bootstrap.sh) is needed");
  char *argv[] = { tool, "-enc", "UTF-8", path, "-", NULL };
  char *out = NULL;
  int wait = 0;
  ck_assert (g_spawn_sync (NULL, argv, NULL, G_SPAWN_STDERR_TO_DEV_NULL, NULL, NULL, &out,
                           NULL, &wait, NULL));
  ck_assert (g_spawn_check_wait_status (wait, NULL));
  char *text = squeeze (out);
  g_free (out);
  g_free (tool);

  for (int page = 1; page <= n_pages; page++)
    {
      char footer[32];
      snprintf (footer, sizeof footer, "Page %d of %d", page, n_pages);
      ck_assert_msg (strstr (text, footer) != NULL, "no \"%s\"", footer);
    }
  assert_shown (text, "title", d->title);
  assert_shown (text, "caution", d->caution_text);
  assert_lines_shown (text, "input", &d->inputs_left);
  assert_lines_shown (text, "input", &d->inputs_right);
  assert_table_shown (text, "landmark cell", &d->landmarks);
  assert_table_shown (text, "option cell", &d->options);
  assert_shown (text, "heading", d->against_heading);
  assert_lines_shown (text, "against the other hip", &d->against);
  assert_table_shown (text, "result cell", &d->results_table);
  assert_shown (text, "ranges note", d->mc_note);
  assert_lines_shown (text, "flags", &d->flags);
  assert_shown (text, "capacity", d->capacity_text);
  for (size_t i = 0; i < d->n_answers; i++)
    assert_shown (text, "inverse answer", d->answers[i].text);
  assert_shown (text, "heading", d->figure_heading);
  assert_shown (text, "heading", d->sources_heading);
  assert_lines_shown (text, "assumption", &d->assumptions);
  assert_lines_shown (text, "source", &d->sources);
  ck_assert (d->sources.n >= 9);
  printf ("report with %zu options: %d pages, %zu characters of text\n", n_options, n_pages,
          strlen (text));
  g_free (text);
  g_unlink (path);
  g_rmdir (dir);
  g_free (path);
  g_free (dir);

  /* Nothing runs over a page: the band between the content and the
   * footer rule is blank on every page. */
  int w = (int) HL_REPORT_PAGE_WIDTH_PT, h = (int) HL_REPORT_PAGE_HEIGHT_PT;
  for (int page = 0; page < n_pages; page++)
    {
      cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, w, h);
      cairo_t *cr = cairo_create (s);
      hl_report_draw_page (r, cr, page);
      cairo_destroy (cr);
      cairo_surface_flush (s);
      const unsigned char *px = cairo_image_surface_get_data (s);
      int stride = cairo_image_surface_get_stride (s);
      for (int y = FOOTER_BAND_TOP; y <= FOOTER_BAND_BOTTOM; y++)
        for (int x = 0; x < w; x++)
          {
            const unsigned char *p = px + y * stride + 4 * x;
            ck_assert_msg (p[0] > 250 && p[1] > 250 && p[2] > 250,
                           "page %d: ink at (%d, %d) below the content", page + 1, x, y);
          }
      cairo_surface_destroy (s);
    }
  hl_report_free (r);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_report_errors)
{
  HlPlan *plan = demo_plan ();
  HlReportSettings settings;
  HlError err;
  const double bad_targets[] = { 0.0, HL_REPORT_TARGET_JRF_BW_MAX * 2, NAN };

  for (size_t i = 0; i < sizeof bad_targets / sizeof bad_targets[0]; i++)
    {
      hl_report_settings_init (&settings);
      settings.target_jrf_bw = bad_targets[i];
      hl_error_clear (&err);
      ck_assert_ptr_null (hl_report_new (plan, &settings, &err));
      ck_assert_int_eq (err.status, HL_ERR_INVALID);
      ck_assert_str_eq (err.field, "report target-jrf");
    }

  char dir[] = "/tmp/hl-test-report-XXXXXX";
  ck_assert_ptr_nonnull (mkdtemp (dir));
  char path[256];
  snprintf (path, sizeof path, "%s/no/such/report.pdf", dir);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_report_save_pdf (plan, NULL, path, &err), HL_ERR_IO);
  ck_assert_int_ne (access (path, F_OK), 0);
  ck_assert_int_eq (hl_report_save_pdf (plan, NULL, "", &err), HL_ERR_INVALID);
  snprintf (path, sizeof path, "%s/report.pdf", dir);
  ck_assert_int_eq (hl_report_save_pdf (plan, NULL, path, &err), HL_OK);
  ck_assert_int_eq (access (path, F_OK), 0);
  unlink (path);
  rmdir (dir);
  hl_plan_free (plan);
}
END_TEST

/* ---- figures ------------------------------------------------------------------------- */

static const struct {
  const char *path;
  bool ok;
  HlFigureFormat format;
} format_cases[] = {
  { "a.png", true, HL_FIGURE_FORMAT_PNG },
  { "dir.x/b.SVG", true, HL_FIGURE_FORMAT_SVG },
  { "c.Png", true, HL_FIGURE_FORMAT_PNG },
  { "d.jpg", false, HL_FIGURE_FORMAT_PNG },
  { "png", false, HL_FIGURE_FORMAT_PNG },
  { "dir.png/e", false, HL_FIGURE_FORMAT_PNG },
  { "", false, HL_FIGURE_FORMAT_PNG },
};

START_TEST (test_figure_format)
{
  HlFigureFormat f = HL_FIGURE_FORMAT_PNG;
  bool ok = hl_figure_format_from_path (format_cases[_i].path, &f);
  ck_assert_msg (ok == format_cases[_i].ok, "%s", format_cases[_i].path);
  if (ok)
    ck_assert_int_eq (f, format_cases[_i].format);
}
END_TEST

static unsigned
be32 (const unsigned char *p)
{
  return (unsigned) p[0] << 24 | (unsigned) p[1] << 16 | (unsigned) p[2] << 8 | p[3];
}

/* The buffer is not NUL-terminated: look at its last bytes only. */
static bool
ends_with_svg_close (const unsigned char *p, size_t n)
{
  while (n > 0 && (p[n - 1] == '\n' || p[n - 1] == ' '))
    n--;
  return n >= 6 && memcmp (p + n - 6, "</svg>", 6) == 0;
}

START_TEST (test_figures)
{
  HlPlan *plan = demo_plan ();
  unsigned char *out = NULL;
  size_t size = 0;
  HlError err;

  for (int option = -1; option < (int) plan->n_options; option++)
    {
      ck_assert_int_eq (hl_figure_to_buffer (plan, option, FIG_W, FIG_H, HL_FIGURE_FORMAT_PNG,
                                             &out, &size, &err), HL_OK);
      ck_assert (size > 24 && memcmp (out, "\x89PNG\r\n\x1a\n", 8) == 0);
      ck_assert (memcmp (out + 12, "IHDR", 4) == 0);
      ck_assert_uint_eq (be32 (out + 16), FIG_W);
      ck_assert_uint_eq (be32 (out + 20), FIG_H);
      free (out);
      ck_assert_int_eq (hl_figure_to_buffer (plan, option, FIG_W, FIG_H, HL_FIGURE_FORMAT_SVG,
                                             &out, &size, &err), HL_OK);
      ck_assert (size > 100 && strncmp ((const char *) out, "<?xml", 5) == 0);
      ck_assert (size > 100 && ends_with_svg_close (out, size));
      free (out);
    }

  const struct { int option, w, h; } bad[] = {
    { 2, FIG_W, FIG_H }, { -2, FIG_W, FIG_H }, { 0, 10, FIG_H }, { 0, FIG_W, 100000 },
  };
  for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
    {
      out = NULL;
      hl_error_clear (&err);
      ck_assert_int_eq (hl_figure_to_buffer (plan, bad[i].option, bad[i].w, bad[i].h,
                                             HL_FIGURE_FORMAT_PNG, &out, &size, &err),
                        HL_ERR_INVALID);
      ck_assert_ptr_null (out);
    }
  hl_error_clear (&err);
  ck_assert_int_eq (hl_figure_save (plan, 0, FIG_W, FIG_H, "/tmp/figure.gif", &err),
                    HL_ERR_INVALID);
  ck_assert_int_eq (hl_figure_save (plan, 0, FIG_W, FIG_H, "/nonexistent-dir/f.svg", &err),
                    HL_ERR_IO);
  hl_plan_free (plan);
}
END_TEST

/* No two text boxes on any page of the report intersect, and every box is
 * inside the page: with 1 to 13 options (with two-line names, 2 and 13
 * options put an option's inverse answers over a page break, its name
 * repeated at the top of the next page: it ran into the next text). */
static const size_t overlap_option_counts[] = { 1, 2, 4, 8, 13 };

START_TEST (test_report_no_overlap)
{
  size_t n_options = overlap_option_counts[_i / 2];
  HlPlan *plan = plan_with_options (n_options);
  /* Odd runs: names that take two lines beside the inverse answers. */
  if (_i % 2 == 1)
    for (size_t k = 0; k < plan->n_options; k++)
      snprintf (plan->options[k].name, sizeof plan->options[k].name,
                "Medialised cup, long head %zu", k + 1);
  HlReport *r = dated_report (plan);
  int n_pages = hl_report_n_pages (r);
  size_t n_checked = 0;
  for (int page = 0; page < n_pages; page++)
    {
      size_t n = 0;
      HlReportTextBox *b = hl_report_page_text_boxes (r, page, &n);
      ck_assert_msg (n > 0, "page %d draws no text", page + 1);
      for (size_t i = 0; i < n; i++)
        {
          ck_assert_msg (b[i].x >= -0.5 && b[i].y >= -0.5
                         && b[i].x + b[i].w <= HL_REPORT_PAGE_WIDTH_PT + 0.5
                         && b[i].y + b[i].h <= HL_REPORT_PAGE_HEIGHT_PT + 0.5,
                         "%zu options, page %d: \"%s\" (%.1f,%.1f %.1fx%.1f) leaves the page",
                         n_options, page + 1, b[i].text, b[i].x, b[i].y, b[i].w, b[i].h);
          for (size_t j = i + 1; j < n; j++)
            {
              /* Boxes that only touch (a line right under another) are
               * fine: half a point of slack. */
              double ox = fmin (b[i].x + b[i].w, b[j].x + b[j].w) - fmax (b[i].x, b[j].x);
              double oy = fmin (b[i].y + b[i].h, b[j].y + b[j].h) - fmax (b[i].y, b[j].y);
              ck_assert_msg (ox <= 0.5 || oy <= 0.5,
                             "%zu options, page %d: \"%s\" (%.1f,%.1f %.1fx%.1f) and "
                             "\"%s\" (%.1f,%.1f %.1fx%.1f) overlap",
                             n_options, page + 1, b[i].text, b[i].x, b[i].y, b[i].w, b[i].h,
                             b[j].text, b[j].x, b[j].y, b[j].w, b[j].h);
            }
        }
      n_checked += n;
      g_free (b);
    }
  ck_assert_uint_gt (n_checked, 20);
  hl_report_free (r);
  hl_plan_free (plan);
}
END_TEST

static Suite *
chart_report_suite (void)
{
  Suite *s = suite_create ("chart-report");
  TCase *tc = tcase_create ("chart data");
  tcase_add_loop_test (tc, test_chart_data_is_the_core, 0,
                       (int) (sizeof chart_cases / sizeof chart_cases[0]));
  suite_add_tcase (s, tc);
  tc = tcase_create ("chart drawing");
  tcase_add_loop_test (tc, test_chart_draw, 0, HL_CHART_N * HL_CHART_QUANTITY_N * 2);
  tcase_add_test (tc, test_chart_series_styles);
  suite_add_tcase (s, tc);
  tc = tcase_create ("errors");
  tcase_add_test (tc, test_chart_errors);
  tcase_add_test (tc, test_report_errors);
  suite_add_tcase (s, tc);
  tc = tcase_create ("csv");
  tcase_add_test (tc, test_csv);
  suite_add_tcase (s, tc);
  tc = tcase_create ("report");
  tcase_add_loop_test (tc, test_report, 0,
                       (int) (sizeof report_option_counts / sizeof report_option_counts[0]));
  tcase_add_loop_test (tc, test_report_loses_nothing, 0,
                       (int) (sizeof lost_option_counts / sizeof lost_option_counts[0]));
  tcase_add_loop_test (tc, test_report_no_overlap, 0,
                       2 * (int) (sizeof overlap_option_counts
                                  / sizeof overlap_option_counts[0]));
  tcase_set_timeout (tc, 60);
  suite_add_tcase (s, tc);
  tc = tcase_create ("figures");
  tcase_add_loop_test (tc, test_figure_format, 0,
                       (int) (sizeof format_cases / sizeof format_cases[0]));
  tcase_add_test (tc, test_figures);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  SRunner *sr = srunner_create (chart_report_suite ());
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}

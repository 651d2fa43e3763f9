/* hl-report.c: the A4 PDF report, figures and sweep tables (cairo only).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Layout is a flow of blocks.  Each block draws itself at a given y, or
 * only measures itself (draw false); the flow breaks pages between blocks.
 * The whole flow is run once per page drawn, so a page needs no stored
 * positions, and once to count the pages for each type scale tried.
 */
#include "config.h"

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <time.h>

#include "hl-analysis.h"
#include "hl-chart.h"
#include "hl-i18n.h"
#include "hl-image.h"
#include "hl-measure.h"
#include "hl-palette.h"
#include "hl-plan-io.h"
#include "hl-render.h"
#include <glib.h>

#include "hl-report.h"
#include "hl-result-fields.h"
#include "hl-version.h"

/* Page geometry, pt. */
#define MARGIN_X 38.0
#define MARGIN_TOP 34.0
#define FOOTER_H 30.0
#define BLOCK_GAP 7.0
/* Type sizes at scale 1, pt. */
#define TYPE_TITLE 15.0
#define TYPE_CASE 10.5
#define TYPE_HEADING 10.0
#define TYPE_BODY 8.0
#define TYPE_TABLE 7.4
#define TYPE_SMALL 6.8
#define LINE_FACTOR 1.28
/* Scales tried, largest first, until the report keeps to two pages. */
static const double layout_scales[] = { 1.0, 0.93, 0.86, 0.8, 0.74, 0.68, 0.63, 0.58 };
/* Heights of the figure and of one chart panel at scale 1, pt. */
#define FIGURE_H 300.0
#define CHART_H 118.0
#define CHART_COLS 2
#define RESULT_COL_MAX 96.0
/* Room for one table cell's text. */
#define CELL_MAX 160
/* Figure drawing margin, px. */
#define FIGURE_MARGIN_PX 12.0
/* A report needs at least this many samples for its ranges to mean much;
 * fewer are drawn all the same but the note says so. */
#define CHART_STEPS 81
#define PERCENT 100.0
/* Changes against native smaller than this share are shown as 0.0%. */
#define CHANGE_EPS 1e-9

/* The inverse questions asked for each case. */
typedef struct {
  size_t row;              /* 0 native, 1 + i option i */
  HlInverseAnswer answer;
  char text[384];
} HlReportAnswer;

struct HlReport {
  HlPlan *plan;
  HlReportSettings settings;
  char date[32];
  HlModel model;
  HlResult *results;       /* 1 + n_options */
  size_t n_shown;          /* options in the tables */

  bool have_mc;
  HlMcSettings mc;
  bool m_assumed;
  HlMcSummary *mc_summary;
  HlMcInfo mc_info;

  HlReportAnswer *answers;
  size_t n_answers;

  HlChartData *charts[HL_CHART_N];
  int figure_option;

  double scale;
  int n_pages;
  double compute_s;
};

/* Set when a table of the layout could not be allocated (its block is then
 * left out): the report and its PDF are refused instead of missing a
 * table.  Per thread, reset before each layout. */
static _Thread_local bool layout_out_of_memory;

/* ---- Colours ------------------------------------------------------------ */

static const HlRgba ink = { 0.10, 0.11, 0.12, 1.0 };
static const HlRgba ink_soft = { 0.33, 0.35, 0.38, 1.0 };
static const HlRgba rule = { 0.72, 0.74, 0.77, 1.0 };
static const HlRgba shade = { 0.93, 0.94, 0.95, 1.0 };
static const HlRgba zebra = { 0.972, 0.976, 0.98, 1.0 };

static void
set_rgba (cairo_t *cr, HlRgba c)
{
  cairo_set_source_rgba (cr, c.r, c.g, c.b, c.a);
}

static HlRgba
heading_colour (void)
{
  return hl_palette_color (HL_ROLE_WEIGHT, false);
}

/* ---- Settings and data --------------------------------------------------- */

void
hl_report_settings_init (HlReportSettings *s)
{
  memset (s, 0, sizeof *s);
  s->date = NULL;
  s->target_jrf_bw = HL_REPORT_TARGET_JRF_BW_DEFAULT;
  s->uncertainty = true;
  s->figure_option = HL_REPORT_FIGURE_FIRST;
}

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

static bool
add_answer (HlReport *r, size_t row, HlStatus st, const HlInverseAnswer *a)
{
  if (st != HL_OK && st != HL_ERR_NOT_REACHABLE && st != HL_ERR_NOT_CONVERGED)
    return false;
  HlReportAnswer *ra = &r->answers[r->n_answers++];
  ra->row = row;
  ra->answer = *a;
  hl_inverse_answer_format (a, ra->text, sizeof ra->text);
  return true;
}

/* Native: the cane, each hand's load and the lean; each option as well the
 * two femoral offset questions. */
#define ANSWERS_NATIVE 4
#define ANSWERS_OPTION 6

static HlStatus
compute_answers (HlReport *r, HlError *err)
{
  const HlPlan *p = r->plan;
  double target = r->settings.target_jrf_bw;

  r->answers = calloc (ANSWERS_NATIVE + ANSWERS_OPTION * r->n_shown, sizeof *r->answers);
  if (r->answers == NULL)
    return hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                         _("There is not enough memory for the report."));
  for (size_t row = 0; row <= r->n_shown; row++)
    {
      const HlRecon *recon = row == 0 ? NULL : &p->options[row - 1].recon;
      HlInverseAnswer a;
      HlError e;
      bool ok = true;   /* after a failure, e keeps its message */

      if (recon != NULL)
        {
          if (ok)
            hl_error_clear (&e);
          ok = ok && add_answer (r, row, hl_inverse_offset_for_arm (&r->model, recon, NULL,
                                                                    &a, &e), &a);
          if (ok)
            hl_error_clear (&e);
          ok = ok && add_answer (r, row, hl_inverse_offset_for_global (&r->model, recon,
                                                                       NULL, &a, &e), &a);
        }
      if (ok)
        hl_error_clear (&e);
      ok = ok && add_answer (r, row, hl_inverse_cane_for_jrf (&r->model, recon, target,
                                                              p->cane.distance_mm, NULL,
                                                              &a, &e), &a);
      if (recon == NULL)
        for (int site = HL_LOAD_SITE_CONTRALATERAL; ok && site <= HL_LOAD_SITE_IPSILATERAL;
             site++)
          {
            hl_error_clear (&e);
            ok = add_answer (r, row, hl_inverse_load_for_jrf (&r->model, recon,
                                                              (HlLoadSite) site, target,
                                                              NULL, &a, &e), &a);
          }
      if (ok)
        hl_error_clear (&e);
      ok = ok && add_answer (r, row, hl_inverse_lean_for_capacity (&r->model, recon, NULL,
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
compute_mc (HlReport *r, HlError *err)
{
  const HlPlan *p = r->plan;
  hl_mc_settings_for_plan (p, &r->mc, &r->m_assumed);
  r->mc_summary = calloc (1 + p->n_options, sizeof *r->mc_summary);
  HlMcWorkspace *ws = hl_mc_workspace_new (r->mc.n_samples,
                                           p->n_options > 0 ? p->n_options : 1);
  HlStatus st;
  if (r->mc_summary == NULL || ws == NULL)
    st = hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                       _("There is not enough memory for the uncertainty samples."));
  else
    st = hl_mc_run (ws, &r->model, p->options, p->n_options, &r->mc, r->mc_summary,
                    &r->mc_info, err);
  hl_mc_workspace_free (ws);
  r->have_mc = st == HL_OK;
  return st;
}

static int layout_count_pages (const HlReport *r, double scale);

HlReport *
hl_report_new (const HlPlan *plan, const HlReportSettings *settings, HlError *err)
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
  HlReport *r = calloc (1, sizeof *r);
  if (r == NULL || (r->plan = hl_plan_copy (plan)) == NULL)
    {
      free (r);
      hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                    _("There is not enough memory for the report."));
      return NULL;
    }
  r->settings = *settings;
  r->settings.date = NULL;
  if (settings->date != NULL)
    snprintf (r->date, sizeof r->date, "%s", settings->date);
  else
    {
      GDateTime *dt = g_date_time_new_now_utc ();
      gchar *text = dt != NULL ? g_date_time_format (dt, "%Y-%m-%d") : NULL;
      snprintf (r->date, sizeof r->date, "%s", text != NULL ? text : "?");
      g_free (text);
      if (dt != NULL)
        g_date_time_unref (dt);
    }
  r->n_shown = plan->n_options < HL_REPORT_OPTIONS_MAX ? plan->n_options
                                                       : HL_REPORT_OPTIONS_MAX;
  int fo = settings->figure_option;
  if (fo == HL_REPORT_FIGURE_FIRST)
    fo = plan->n_options > 0 ? 0 : -1;
  r->figure_option = fo >= 0 && (size_t) fo < plan->n_options ? fo : -1;

  HlStatus st = hl_model_prepare (&r->model, r->plan, err);
  if (st == HL_OK)
    {
      r->results = calloc (1 + plan->n_options, sizeof *r->results);
      st = r->results == NULL
           ? hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                           _("There is not enough memory for the report."))
           : hl_plan_solve_all (r->plan, r->results, err);
    }
  if (st == HL_OK && settings->uncertainty)
    st = compute_mc (r, err);
  if (st == HL_OK)
    st = compute_answers (r, err);
  for (int k = 0; st == HL_OK && k < HL_CHART_N; k++)
    {
      r->charts[k] = hl_chart_data_new (r->plan, (HlChartKind) k, CHART_STEPS,
                                        HL_CHART_BAND_STEPS_DEFAULT,
                                        r->have_mc ? &(HlMcSettings) {
                                          .seed = r->mc.seed,
                                          .n_samples = HL_CHART_BAND_SAMPLES_DEFAULT,
                                          .landmark_sd_mm = r->mc.landmark_sd_mm,
                                          .magnification_sd = r->mc.magnification_sd,
                                          .magnification = r->mc.magnification,
                                          .line_angle_sd_deg = r->mc.line_angle_sd_deg,
                                        } : NULL, err);
      if (r->charts[k] == NULL)
        st = err != NULL && err->status != HL_OK ? err->status : HL_ERR_NOMEM;
    }
  if (st != HL_OK)
    {
      hl_report_free (r);
      return NULL;
    }
  r->compute_s = now_s () - t0;

  /* The largest type that keeps to two pages. */
  layout_out_of_memory = false;
  size_t n_scales = sizeof layout_scales / sizeof layout_scales[0];
  for (size_t i = 0; i < n_scales; i++)
    {
      r->scale = layout_scales[i];
      r->n_pages = layout_count_pages (r, r->scale);
      if (r->n_pages <= HL_REPORT_PAGES_MAX)
        break;
    }
  if (r->n_pages > HL_REPORT_PAGES_MAX)
    r->n_pages = HL_REPORT_PAGES_MAX;
  if (layout_out_of_memory)
    {
      hl_report_free (r);
      hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                    _("There is not enough memory for the report."));
      return NULL;
    }
  return r;
}

void
hl_report_free (HlReport *r)
{
  if (r == NULL)
    return;
  for (int k = 0; k < HL_CHART_N; k++)
    hl_chart_data_free (r->charts[k]);
  free (r->answers);
  free (r->mc_summary);
  free (r->results);
  hl_plan_free (r->plan);
  free (r);
}

int
hl_report_n_pages (const HlReport *r)
{
  return r->n_pages;
}

double
hl_report_compute_seconds (const HlReport *r)
{
  return r->compute_s;
}

/* ---- Text ------------------------------------------------------------------ */

typedef struct {
  const HlReport *r;
  cairo_t *cr;
  double s;          /* type scale */
  int page;          /* the page being laid out */
  int target;        /* the page being drawn; -1 to measure */
  double y;
} HlLayout;

static double
page_bottom (void)
{
  return HL_REPORT_PAGE_HEIGHT_PT - FOOTER_H - 6.0;
}

static double
content_left (void)
{
  return MARGIN_X;
}

static double
content_width (void)
{
  return HL_REPORT_PAGE_WIDTH_PT - 2.0 * MARGIN_X;
}

static void
set_font (cairo_t *cr, double size, bool bold)
{
  cairo_select_font_face (cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                          bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size (cr, size);
}

static double
text_width (cairo_t *cr, const char *s)
{
  cairo_text_extents_t e;
  cairo_text_extents (cr, s, &e);
  return e.x_advance;
}

/* Draws s with its top at y. */
static void
show_at (cairo_t *cr, const char *s, double x, double y, double size)
{
  cairo_font_extents_t fe;
  cairo_font_extents (cr, &fe);
  cairo_move_to (cr, x, y + fe.ascent + 0.5 * (size * LINE_FACTOR - fe.height));
  cairo_show_text (cr, s);
}

/* Word-wrapped text in `width` from (x, y); returns its height.  Lines
 * break at spaces; a word longer than the width gets a line of its own. */
static double
wrap_text (cairo_t *cr, const char *text, double x, double y, double width,
           double size, bool bold, HlRgba colour, bool right, bool draw)
{
  const double lh = size * LINE_FACTOR;
  char line[1024];
  size_t len = 0;
  int n_lines = 0;
  const char *p = text;

  set_font (cr, size, bold);
  set_rgba (cr, colour);
  while (true)
    {
      while (*p == ' ')
        p++;
      const char *w_end = p;
      while (*w_end != '\0' && *w_end != ' ' && *w_end != '\n')
        w_end++;
      size_t wl = (size_t) (w_end - p);
      bool flush = false;

      if (wl > 0)
        {
          char trial[1024];
          int n = snprintf (trial, sizeof trial, "%.*s%s%.*s", (int) len, line,
                            len > 0 ? " " : "", (int) wl, p);
          if (len > 0 && (n >= (int) sizeof trial || text_width (cr, trial) > width))
            flush = true;
          else
            {
              snprintf (line, sizeof line, "%s", trial);
              len = strlen (line);
              p = w_end;
            }
        }
      bool end = *p == '\0' && !flush;
      bool newline = !flush && *p == '\n';
      if (flush || end || newline)
        {
          if (len > 0 || newline)
            {
              if (draw)
                show_at (cr, line, right ? x + width - text_width (cr, line) : x,
                         y + n_lines * lh, size);
              n_lines++;
            }
          len = 0;
          line[0] = '\0';
          if (newline)
            p++;
          if (end)
            break;
        }
    }
  return n_lines * lh;
}

/* ---- Tables -------------------------------------------------------------- */

typedef struct {
  int n_cols;
  int n_rows;              /* including the header rows */
  int header_rows;
  const double *widths;    /* pt, sum = table width */
  const bool *right;       /* per column */
  char (*cells)[CELL_MAX]; /* n_rows * n_cols */
  const bool *bold_rows;   /* may be NULL */
} HlTable;

#define CELL_PAD 2.6

static double
table_row_height (cairo_t *cr, const HlTable *t, int row, double size)
{
  double h = 0.0;
  for (int c = 0; c < t->n_cols; c++)
    {
      bool bold = row < t->header_rows || (t->bold_rows && t->bold_rows[row]);
      double ch = wrap_text (cr, t->cells[row * t->n_cols + c], 0, 0,
                             t->widths[c] - 2 * CELL_PAD, size, bold, ink, false, false);
      h = fmax (h, ch);
    }
  return h + 2.0 * 1.6;
}

static double
table_block (cairo_t *cr, const HlTable *t, double x, double y, double size, bool draw)
{
  double total_w = 0.0;
  for (int c = 0; c < t->n_cols; c++)
    total_w += t->widths[c];

  double cy = y;
  for (int row = 0; row < t->n_rows; row++)
    {
      double h = table_row_height (cr, t, row, size);
      bool header = row < t->header_rows;
      bool bold = header || (t->bold_rows && t->bold_rows[row]);
      if (draw)
        {
          if (header || (row - t->header_rows) % 2 == 1)
            {
              set_rgba (cr, header ? shade : zebra);
              cairo_rectangle (cr, x, cy, total_w, h);
              cairo_fill (cr);
            }
          double cx = x;
          for (int c = 0; c < t->n_cols; c++)
            {
              wrap_text (cr, t->cells[row * t->n_cols + c], cx + CELL_PAD, cy + 1.6,
                         t->widths[c] - 2 * CELL_PAD, size, bold, ink,
                         t->right[c] && !(header && c == 0), true);
              cx += t->widths[c];
            }
          if (header && row == t->header_rows - 1)
            {
              set_rgba (cr, ink_soft);
              cairo_set_line_width (cr, 0.7);
              cairo_move_to (cr, x, cy + h);
              cairo_line_to (cr, x + total_w, cy + h);
              cairo_stroke (cr);
            }
        }
      cy += h;
    }
  if (draw)
    {
      set_rgba (cr, rule);
      cairo_set_line_width (cr, 0.6);
      cairo_move_to (cr, x, cy);
      cairo_line_to (cr, x + total_w, cy);
      cairo_stroke (cr);
    }
  return cy - y;
}

static HlTable *
table_new (int n_cols, int n_rows, int header_rows)
{
  HlTable *t = calloc (1, sizeof *t);
  if (t == NULL)
    {
      layout_out_of_memory = true;
      return NULL;
    }
  t->cells = calloc ((size_t) (n_cols * n_rows), CELL_MAX);
  if (t->cells == NULL)
    {
      free (t);
      layout_out_of_memory = true;
      return NULL;
    }
  t->n_cols = n_cols;
  t->n_rows = n_rows;
  t->header_rows = header_rows;
  return t;
}

static void
table_free (HlTable *t)
{
  if (t == NULL)
    return;
  free (t->cells);
  free (t);
}

static void
cell_set (HlTable *t, int row, int col, const char *fmt, ...)
  __attribute__ ((format (printf, 4, 5)));

static void
cell_set (HlTable *t, int row, int col, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  vsnprintf (t->cells[row * t->n_cols + col], CELL_MAX, fmt, ap);
  va_end (ap);
}

/* ---- Blocks -------------------------------------------------------------- */

typedef double (*HlBlockFn) (HlLayout *L, double y, bool draw);

static const char *
case_name (const HlReport *r, size_t row)
{
  return row == 0 ? _("Native") : r->plan->options[row - 1].name;
}

static double
block_title (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  const double s = L->s;
  double x = content_left (), w = content_width ();
  char line[512];
  double h = 0.0;

  h += wrap_text (L->cr, _("Hip biomechanics planning report: single-leg stance"),
                  x, y + h, w, TYPE_TITLE * s, true, ink, false, draw);
  snprintf (line, sizeof line, _("Case: %s"), p->label);
  h += wrap_text (L->cr, line, x, y + h + 2, w, TYPE_CASE * s, true, ink, false, draw) + 2;
  snprintf (line, sizeof line,
            _("Operated side: %s  \xc2\xb7  body mass %.1f kg (body weight %.1f N)  "
              "\xc2\xb7  report date %s  \xc2\xb7  hiplever %s, mechanical model %s"),
            _(hl_side_name (p->side)), p->mass_kg, hl_plan_body_weight (p), r->date,
            hl_program_version (), HL_MODEL_VERSION);
  h += wrap_text (L->cr, line, x, y + h + 1, w, TYPE_BODY * s, false, ink_soft, false, draw) + 1;
  return h;
}

static double
block_caution (HlLayout *L, double y, bool draw)
{
  const double s = L->s;
  const double pad = 6.0 * s;
  const double bar = 4.0;
  double x = content_left (), w = content_width ();
  double tw = w - 2 * pad - bar;
  double h1 = wrap_text (L->cr, _("CAUTION: planning aid only"), 0, 0, tw,
                         TYPE_CASE * s, true, ink, false, false);
  double h2 = wrap_text (L->cr, hl_caution_text (), 0, 0, tw, TYPE_BODY * s, false, ink,
                         false, false);
  double h = h1 + h2 + 2 * pad + 2;
  if (draw)
    {
      HlRgba fill = hl_palette_color (HL_ROLE_ERROR_FILL, false);
      HlRgba edge = hl_palette_color (HL_ROLE_ERROR, false);
      set_rgba (L->cr, fill);
      cairo_rectangle (L->cr, x, y, w, h);
      cairo_fill (L->cr);
      set_rgba (L->cr, edge);
      cairo_rectangle (L->cr, x, y, bar, h);
      cairo_fill (L->cr);
      cairo_set_line_width (L->cr, 1.4);
      cairo_rectangle (L->cr, x + 0.7, y + 0.7, w - 1.4, h - 1.4);
      cairo_stroke (L->cr);
      wrap_text (L->cr, _("CAUTION: planning aid only"), x + bar + pad, y + pad, tw,
                 TYPE_CASE * s, true, (HlRgba) { 0.55, 0.2, 0.0, 1.0 }, false, true);
      wrap_text (L->cr, hl_caution_text (), x + bar + pad, y + pad + h1 + 2, tw,
                 TYPE_BODY * s, false, ink, false, true);
    }
  return h;
}

static double
heading (HlLayout *L, const char *text, double y, bool draw)
{
  double x = content_left (), w = content_width ();
  double h = wrap_text (L->cr, text, x, y, w, TYPE_HEADING * L->s, true, heading_colour (),
                        false, draw);
  if (draw)
    {
      set_rgba (L->cr, rule);
      cairo_set_line_width (L->cr, 0.6);
      cairo_move_to (L->cr, x, y + h + 0.8);
      cairo_line_to (L->cr, x + w, y + h + 0.8);
      cairo_stroke (L->cr);
    }
  return h + 3.0;
}

/* Two key-value columns side by side. */
static double
kv_columns (HlLayout *L, double y, const char *const *left, int n_left,
            const char *const *right, int n_right, bool draw)
{
  const double s = L->s;
  double colw = 0.5 * content_width () - 6.0;
  double hl = 0.0, hr = 0.0;
  for (int i = 0; i < n_left; i++)
    hl += wrap_text (L->cr, left[i], content_left (), y + hl, colw, TYPE_BODY * s * 0.95,
                     false, ink, false, draw);
  for (int i = 0; i < n_right; i++)
    hr += wrap_text (L->cr, right[i], content_left () + colw + 12.0, y + hr, colw,
                     TYPE_BODY * s * 0.95, false, ink, false, draw);
  return fmax (hl, hr);
}

static const char *
hand_words (HlHand hand)
{
  return hand == HL_HAND_IPSILATERAL ? _("same-side hand") : _("opposite hand");
}

static double
block_inputs (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  const HlLimbTableInfo *limb = hl_limb_table_info (p->model.limb_table);
  char l[8][256], rt[8][256];
  const char *lp[8], *rp[8];
  int nl = 0, nr = 0;
  double h = heading (L, _("Inputs"), y, draw);

  snprintf (l[nl++], 256, _("Stance-limb mass fraction %.4f (%s)"),
            hl_plan_limb_fraction (p), limb != NULL ? _(limb->label) : "");
  snprintf (l[nl++], 256, _("Body-weight line: %s"),
            p->model.bw_line == HL_BW_LINE_SEGMENTAL
            ? _("segmental (whole-body centre of mass on the midline)")
            : _("on the midline (simplified)"));
  if (p->model.abductor_line == HL_ABDUCTOR_LINE_AUTO
      && hl_landmarks_has (&p->landmarks, HL_LM_ABDUCTOR_ORIGIN))
    snprintf (l[nl++], 256, "%s", _("Abductor line: from the placed origin to the insertion"));
  else
    snprintf (l[nl++], 256, _("Abductor line: %.1f deg to the horizontal through the insertion"),
              p->model.abductor_angle_deg);
  snprintf (l[nl++], 256, _("Lateral trunk lean: %.1f mm towards the stance side"),
            p->model.lean_mm);
  double m = r->mc.magnification;
  bool assumed = r->m_assumed;
  if (!r->have_mc)
    hl_calibration_magnification (&p->calibration, &m, &assumed, NULL);
  if (p->radiograph.present)
    snprintf (l[nl++], 256, _("Magnification %.3f; calibration: %s"), m,
              hl_cal_source_label (hl_image_calibration_source (p)));
  else
    snprintf (l[nl++], 256, assumed ? _("Magnification %.3f (assumed: no usable calibration)")
                                    : _("Magnification %.3f (from the calibration)"), m);
  snprintf (l[nl++], 256, _("Abductor capacity %.2f N m per kg (an assumption)"),
            p->capacity.torque_nm_per_kg);

  if (p->cane.enabled)
    snprintf (rt[nr++], 256, _("Cane: %.1f N (%.1f%% of body weight) in the %s, %.0f mm from "
                               "the midline"),
              hl_plan_cane_force (p), PERCENT * hl_plan_cane_force (p) / hl_plan_body_weight (p),
              hand_words (p->cane.hand), p->cane.distance_mm);
  else
    snprintf (rt[nr++], 256, "%s", _("Cane: none"));
  for (int hand = 0; hand < 2; hand++)
    snprintf (rt[nr++], 256, _("Load in the %s: %.1f kg, %.0f mm from the midline"),
              hand_words ((HlHand) hand), p->loads.hand[hand].mass_kg,
              p->loads.hand[hand].distance_mm);
  snprintf (rt[nr++], 256, _("Load on the midline: %.1f kg"), p->loads.midline_kg);
  snprintf (rt[nr++], 256, _("Flag tolerances: global offset drop %.1f mm, leg length %.1f mm, "
                             "abductor slackening %.1f mm"),
            p->tol.global_offset_drop_mm, p->tol.leg_length_mm, p->tol.abductor_slack_mm);
  snprintf (rt[nr++], 256, _("Uncertainty: %zu samples, seed %llu; SD landmark %.2g mm, "
                             "magnification %.3g, line angle %.2g deg"),
            p->uncertainty.n_samples, (unsigned long long) p->uncertainty.seed,
            p->uncertainty.landmark_sd_mm, p->uncertainty.magnification_sd,
            p->uncertainty.line_angle_sd_deg);
  for (int i = 0; i < nl; i++)
    lp[i] = l[i];
  for (int i = 0; i < nr; i++)
    rp[i] = rt[i];
  h += kv_columns (L, y + h, lp, nl, rp, nr, draw);
  return h;
}

static double
block_landmarks (HlLayout *L, double y, bool draw)
{
  const HlPlan *p = L->r->plan;
  /* three columns side by side keep the table as short as it was with
   * the mechanics landmarks alone */
  enum { N_COLS = 3 };
  const int per_col = (HL_LM_COUNT + N_COLS - 1) / N_COLS;
  double colw = content_width () / N_COLS - 8.0;
  const double widths[3] = { colw - 76.0, 38.0, 38.0 };
  const bool right[3] = { false, true, true };
  double h = wrap_text (L->cr, _("Landmarks, plan frame in true millimetres (x towards the "
                                 "patient's left, y superior)"),
                        content_left (), y, content_width (), TYPE_BODY * L->s, true, ink,
                        false, draw) + 2.0;
  double th = 0.0;

  for (int side = 0; side < N_COLS; side++)
    {
      int first = side * per_col;
      int last = first + per_col < HL_LM_COUNT ? first + per_col : HL_LM_COUNT;
      HlTable *t = table_new (3, 1 + last - first, 1);
      if (t == NULL)
        return h;
      t->widths = widths;
      t->right = right;
      cell_set (t, 0, 0, "%s", _("Landmark"));
      cell_set (t, 0, 1, "%s", _("x (mm)"));
      cell_set (t, 0, 2, "%s", _("y (mm)"));
      for (int i = first; i < last; i++)
        {
          const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
          int row = 1 + i - first;
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
      double x = content_left () + side * (colw + 12.0);
      th = fmax (th, table_block (L->cr, t, x, y + h, TYPE_SMALL * L->s, draw));
      table_free (t);
    }
  h += th;
  h += wrap_text (L->cr, _("* needed by the mechanics"), content_left (), y + h + 1,
                  content_width (), TYPE_SMALL * L->s, false, ink_soft, false, draw) + 1;
  return h;
}

/* The implants of the templated options, with the four numbers they make
 * (templating.md section 2), under the options table. */
static double
block_implants (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  int n = 0;
  for (size_t i = 0; i < r->n_shown; i++)
    n += p->options[i].recon.tmpl.on;
  if (n == 0)
    return 0.0;
  double h = 4.0 + wrap_text (L->cr, _("Implants of the templated options (catalogue as "
                                       "recorded in the plan; sizes in mm)"),
                              content_left (), y + 4.0, content_width (), TYPE_BODY * L->s,
                              true, ink, false, draw) + 2.0;
  double w = (content_width () - 110.0) / 5.0;
  const double widths[6] = { 110.0, w, w, w, 0.6 * w, 1.4 * w };
  const bool right[6] = { false, false, false, false, false, false };
  HlTable *t = table_new (6, 1 + n, 1);
  if (t == NULL)
    return h;
  t->widths = widths;
  t->right = right;
  const char *heads[6] = {
    _("Option"), _("Catalogue"), _("Cup: family, size, liner, inclination"),
    _("Stem: family, size, version, seat"), _("Head"),
    _("Derived: cup medialisation, cup height, femoral offset, femoral length (mm)"),
  };
  for (int c = 0; c < 6; c++)
    cell_set (t, 0, c, "%s", heads[c]);
  int row = 1;
  for (size_t i = 0; i < r->n_shown; i++)
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
      cell_set (t, row, 2, "%s, %.0f, %s, %.1f°", tm->cup_family, tm->cup_diameter_mm,
                tm->liner, tm->inclination_deg);
      cell_set (t, row, 3, "%s, %s, %s, %+.1f mm", tm->stem_family, tm->stem_size,
                tm->version, tm->seat_mm);
      cell_set (t, row, 4, "%+.0f mm", tm->head_length_mm);
      cell_set (t, row, 5, "%+.1f, %+.1f, %+.1f, %+.1f%s", rc->cup_medial_mm,
                rc->cup_superior_mm, rc->femoral_offset_mm, rc->femoral_length_mm,
                tm->resolved ? "" : _(" (as saved: catalogue not at hand or changed)"));
      row++;
    }
  h += table_block (L->cr, t, content_left (), y + h, TYPE_TABLE * L->s, draw);
  table_free (t);
  return h;
}

static double
block_options (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  double h = wrap_text (L->cr, _("Reconstruction options (changes against the native hip)"),
                        content_left (), y, content_width (), TYPE_BODY * L->s, true, ink,
                        false, draw) + 2.0;
  if (p->n_options == 0)
    return h + wrap_text (L->cr, _("No options in this plan: the native hip only."),
                          content_left (), y + h, content_width (), TYPE_BODY * L->s,
                          false, ink, false, draw);

  double wname = content_width () - 6 * 62.0;
  const double widths[7] = { wname, 62, 62, 62, 62, 62, 62 };
  const bool right[7] = { false, true, true, true, true, true, true };
  HlTable *t = table_new (7, 1 + (int) r->n_shown, 1);
  if (t == NULL)
    return h;
  t->widths = widths;
  t->right = right;
  const char *heads[7] = {
    _("Option"), _("Cup medialisation (mm, + medial)"), _("Cup height (mm, + superior)"),
    _("Femoral offset (mm, + lateral)"), _("Femoral length (mm, + longer)"),
    _("Head length (mm, + longer)"), _("Neck-shaft angle (deg)"),
  };
  for (int c = 0; c < 7; c++)
    cell_set (t, 0, c, "%s", heads[c]);
  for (size_t i = 0; i < r->n_shown; i++)
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
  h += table_block (L->cr, t, content_left (), y + h, TYPE_TABLE * L->s, draw);
  table_free (t);
  h += block_implants (L, y + h, draw);
  if (p->n_options > r->n_shown)
    {
      char note[160];
      snprintf (note, sizeof note, _("%zu further options are not shown here: see the "
                                     "planning summary."), p->n_options - r->n_shown);
      h += wrap_text (L->cr, note, content_left (), y + h + 1, content_width (),
                      TYPE_SMALL * L->s, false, ink_soft, false, draw) + 1;
    }
  return h;
}

static double
block_results (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlResultField *rows[HL_RESULT_FIELD_MAX];
  const int n_plain = (int) hl_result_fields_for (HL_OUT_REPORT, rows);
  const int n_mc = r->have_mc ? 3 : 0;
  const int n_cols = 2 + (int) r->n_shown;
  double h = heading (L, _("Results: native hip and options (change against native)"), y, draw);

  HlTable *t = table_new (n_cols, 1 + n_plain + n_mc, 1);
  if (t == NULL)
    return h;
  double label_w = 150.0;
  /* Few columns stay near their labels instead of spreading over the page. */
  double colw = fmin (RESULT_COL_MAX, (content_width () - label_w) / (n_cols - 1));
  double widths[2 + HL_REPORT_OPTIONS_MAX];
  bool right[2 + HL_REPORT_OPTIONS_MAX];
  bool bold[32] = { false };
  widths[0] = label_w;
  right[0] = false;
  for (int c = 1; c < n_cols; c++)
    widths[c] = colw, right[c] = true;
  t->widths = widths;
  t->right = right;
  t->bold_rows = bold;
  for (int i = 0; i < n_plain; i++)   /* the joint force in body weights, the headline */
    bold[1 + i] = strcmp (rows[i]->key, "joint-reaction-force-bw") == 0;

  cell_set (t, 0, 0, "%s", _("Quantity"));
  for (size_t row = 0; row <= r->n_shown; row++)
    cell_set (t, 0, 1 + (int) row, "%s", case_name (r, row));

  for (int i = 0; i < n_plain; i++)
    {
      const HlResultField *rr = rows[i];
      double native = rr->get (&r->results[0]);
      cell_set (t, 1 + i, 0, "%s", _(rr->label));
      for (size_t row = 0; row <= r->n_shown; row++)
        {
          double v = rr->get (&r->results[row]);
          char *cell = t->cells[(1 + i) * n_cols + 1 + (int) row];
          if (!isfinite (v))
            snprintf (cell, CELL_MAX, "%s", _("not measured"));
          else if (row == 0 || rr->kind != HL_FIELD_PERCENT || fabs (native) < CHANGE_EPS)
            snprintf (cell, CELL_MAX, rr->kind == HL_FIELD_CHANGE ? "%+.*f" : "%.*f",
                      rr->decimals, v);
          else
            {
              double pct = PERCENT * (v - native) / fabs (native);
              if (fabs (pct) < 0.05)
                pct = 0.0;
              snprintf (cell, CELL_MAX, "%.*f (%+.1f%%)", rr->decimals, v, pct);
            }
        }
    }
  if (r->have_mc)
    {
      int base = 1 + n_plain;
      cell_set (t, base, 0, "%s", _("Joint force, 5-95% range (x body weight)"));
      cell_set (t, base + 1, 0, "%s", _("Abductor force, 5-95% range (x body weight)"));
      cell_set (t, base + 2, 0, "%s", _("Samples in which the option lowers the joint "
                                        "force against native"));
      for (size_t row = 0; row <= r->n_shown; row++)
        {
          const HlMcSummary *m = &r->mc_summary[row];
          int c = 1 + (int) row;
          cell_set (t, base, c, "%.2f to %.2f", m->jrf_bw.p05, m->jrf_bw.p95);
          cell_set (t, base + 1, c, "%.2f to %.2f", m->abductor_force_bw.p05,
                    m->abductor_force_bw.p95);
          if (row == 0 || !isfinite (m->share_lower_jrf))
            cell_set (t, base + 2, c, "%s", row == 0 ? _("(reference)") : "");
          else
            cell_set (t, base + 2, c, "%.0f%%", PERCENT * m->share_lower_jrf);
        }
    }
  h += table_block (L->cr, t, content_left (), y + h, TYPE_TABLE * L->s, draw);
  table_free (t);
  return h;
}

static double
block_flags (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  double h = heading (L, _("Flags in plain words"), y, draw);
  char line[6144];

  for (size_t row = 0; row <= r->n_shown; row++)
    {
      const HlResult *res = &r->results[row];
      size_t len = (size_t) snprintf (line, sizeof line, "%s: ", case_name (r, row));
      if (res->flags == 0)
        snprintf (line + len, sizeof line - len, "%s", _("none."));
      for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
        {
          if ((res->flags & bit) == 0 || len >= sizeof line)
            continue;
          len += (size_t) snprintf (line + len, sizeof line - len, "%s", hl_flag_text ((HlFlag) bit));
          if (bit == HL_FLAG_IMPLAUSIBLE && len < sizeof line)
            {
              char why[4 * HL_ERROR_MESSAGE_MAX];
              hl_implausible_describe_all (res, " ", why, sizeof why);
              len += (size_t) snprintf (line + len, sizeof line - len, ": %s", why);
            }
          if (bit == HL_FLAG_ABDUCTORS_NOT_NEEDED && len < sizeof line)
            len += (size_t) snprintf (line + len, sizeof line - len,
                                      _(" (unbalanced moment %.2f N m)"),
                                      fabs (res->unbalanced_nmm) / 1000.0);
          if (len < sizeof line)
            len += (size_t) snprintf (line + len, sizeof line - len, "; ");
        }
      if (res->flags != 0 && len >= 2 && len < sizeof line)
        line[len - 2] = '.', line[len - 1] = '\0';
      h += wrap_text (L->cr, line, content_left (), y + h, content_width (),
                      TYPE_BODY * L->s, false, ink, false, draw);
    }
  const char *cane_note = hl_plan_cane_note (r->plan);
  if (cane_note != NULL)
    h += wrap_text (L->cr, cane_note, content_left (), y + h, content_width (),
                    TYPE_BODY * L->s, false, ink, false, draw);
  return h;
}

static double
block_capacity (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  char line[1024];
  size_t len = 0;

  len += (size_t) snprintf (line + len, sizeof line - len,
                            _("Capacity use: an abductor torque capacity of %.2f N m per kg "
                              "(%.0f N m for %.1f kg) over the native moment arm of %.1f mm "
                              "gives %.0f N; the demand is "),
                            p->capacity.torque_nm_per_kg,
                            p->capacity.torque_nm_per_kg * p->mass_kg, p->mass_kg,
                            r->results[0].abductor_arm_mm, r->model.capacity_force_n);
  for (size_t row = 0; row <= r->n_shown && len < sizeof line; row++)
    len += (size_t) snprintf (line + len, sizeof line - len, "%s%.0f%% (%s)",
                              row == 0 ? "" : ", ", PERCENT * r->results[row].demand,
                              case_name (r, row));
  if (len < sizeof line)
    snprintf (line + len, sizeof line - len, "%s",
              /* xgettext:no-c-format */ _(". Above 100% the pelvis cannot be held level in stance."));
  double h = heading (L, _("Abductor capacity"), y, draw);
  h += wrap_text (L->cr, line, content_left (), y + h, content_width (), TYPE_BODY * L->s,
                  false, ink, false, draw);
  h += wrap_text (L->cr, hl_capacity_assumption_text (), content_left (), y + h + 1,
                  content_width (), TYPE_SMALL * L->s, false, ink_soft, false, draw) + 1;
  return h;
}

static double
block_inverse (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  char title[160];
  snprintf (title, sizeof title, _("Inverse questions (joint-load target %.2f x body weight)"),
            r->settings.target_jrf_bw);
  double h = heading (L, title, y, draw);
  double name_w = 96.0;
  h += wrap_text (L->cr, hl_inverse_caveat (), content_left (), y + h, content_width (),
                  TYPE_BODY * L->s, false, ink, false, draw);

  for (size_t i = 0; i < r->n_answers; i++)
    {
      const HlReportAnswer *a = &r->answers[i];
      if (i == 0 || r->answers[i - 1].row != a->row)
        wrap_text (L->cr, case_name (r, a->row), content_left (), y + h, name_w - 4,
                   TYPE_BODY * L->s, true, ink, false, draw);
      h += wrap_text (L->cr, a->text, content_left () + name_w, y + h,
                      content_width () - name_w, TYPE_BODY * L->s, false, ink, false, draw);
      if (i + 1 < r->n_answers && r->answers[i + 1].row != a->row)
        h += 2.0;
    }
  return h;
}

static double
block_mc_note (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  char line[640];
  if (!r->have_mc)
    return 0.0;
  snprintf (line, sizeof line,
            _("Ranges: Monte Carlo with %zu samples used (%zu dropped), seed %llu; landmark "
              "placement SD %.2g mm per coordinate, magnification SD %.3g about M = %.3f, "
              "abductor line angle SD %.2g deg; native and options share each sample. "
              "Percentiles by definition 7 of Hyndman & Fan 1996. The ranges cover these "
              "input errors only, not the error of the model itself."),
            r->mc_info.n_used, r->mc_info.n_dropped, (unsigned long long) r->mc_info.seed,
            r->mc.landmark_sd_mm, r->mc.magnification_sd, r->mc.magnification,
            r->mc.line_angle_sd_deg);
  return wrap_text (L->cr, line, content_left (), y, content_width (), TYPE_SMALL * L->s,
                    false, ink_soft, false, draw);
}

/* The schematic of page 2 in a width x height box at the report's own
 * text size; markers, lines and bars follow it. */
#define REPORT_FIGURE_FONT_PT 8.0

static void
report_figure (const HlReport *r, cairo_t *cr, double width, double height,
               HlRenderLayout *layout)
{
  HlRenderStyle style;
  HlScene scene;
  HlView view;
  hl_render_style_init (&style, false);
  style.font_px = REPORT_FIGURE_FONT_PT;
  style.size = style.font_px / 12.0;
  style.paint_background = true;
  style.show_caution = false;
  style.layout = layout;
  hl_scene_build (&scene, r->plan, r->figure_option);
  hl_render_fit_view_framed (&scene, &style, width, height, FIGURE_MARGIN_PX * style.size,
                             &view);
  hl_render_scene (cr, &scene, &view, &style, width, height);
}

void
hl_report_figure_layout (const HlReport *r, HlRenderLayout *layout, double *width,
                         double *height)
{
  *width = content_width ();
  *height = FIGURE_H;
  cairo_surface_t *rec = cairo_recording_surface_create (CAIRO_CONTENT_COLOR_ALPHA, NULL);
  cairo_t *cr = cairo_create (rec);
  report_figure (r, cr, *width, *height, layout);
  cairo_destroy (cr);
  cairo_surface_destroy (rec);
}

static double
block_figure (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  char title[160];
  if (r->figure_option >= 0)
    snprintf (title, sizeof title, _("Schematic: option \"%s\" over the native hip (faint), "
                                     "forces to one scale"),
              r->plan->options[r->figure_option].name);
  else
    snprintf (title, sizeof title, "%s", _("Schematic: the native hip, forces to one scale"));
  double h = heading (L, title, y, draw);
  double fh = FIGURE_H * L->s;
  if (draw)
    {
      cairo_t *cr = L->cr;
      cairo_save (cr);
      cairo_translate (cr, content_left (), y + h);
      cairo_rectangle (cr, 0, 0, content_width (), fh);
      cairo_clip (cr);
      report_figure (r, cr, content_width (), fh, NULL);
      cairo_restore (cr);
      set_rgba (cr, rule);
      cairo_set_line_width (cr, 0.6);
      cairo_rectangle (cr, content_left (), y + h, content_width (), fh);
      cairo_stroke (cr);
    }
  return h + fh;
}

static double
block_charts (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  HlChartStyle style;
  hl_chart_style_init (&style, false);
  style.font_px = 7.0 * L->s;
  style.line_px = 1.2;
  style.show_legend = false;
  style.show_bands = r->have_mc;

  double h = heading (L, _("Charts: joint force (left) and abductor force (right)"), y, draw);
  h += hl_chart_draw_legend (L->cr, r->charts[0], &style, content_left (), y + h,
                             content_width (), r->have_mc, draw) + 2.0;
  double cw = content_width () / CHART_COLS;
  double ch = CHART_H * L->s;
  for (int k = 0; k < HL_CHART_N; k++)
    {
      if (draw)
        for (int q = 0; q < HL_CHART_QUANTITY_N; q++)
          hl_chart_draw (L->cr, r->charts[k], (HlChartQuantity) q, &style,
                         content_left () + q * cw, y + h, cw - 4.0, ch);
      h += ch;
    }
  return h;
}

static double
block_assumptions (HlLayout *L, double y, bool draw)
{
  const HlReport *r = L->r;
  const HlPlan *p = r->plan;
  char weight[256];
  snprintf (weight, sizeof weight,
            _("The superincumbent weight is body weight x (1 - %.4f), acting on the %s line; "
              "aids and loads are vertical forces at their distances from the midline."),
            hl_plan_limb_fraction (p),
            p->model.bw_line == HL_BW_LINE_SEGMENTAL ? _("segmental") : _("midline"));
  const char *items[] = {
    _("A static posture in the frontal plane: single-leg stance, not walking, stairs or "
      "rising from a chair (free-body method after Pauwels)."),
    _("Rigid segments and a frictionless hip joint: the joint force acts through the hip "
      "centre."),
    _("Muscles only pull; one resultant abductor line of action stands for the whole group; "
      "no antagonists, no co-contraction."),
    weight,
    _("Landmarks are at true size after the magnification correction; a reconstruction "
      "moves them rigidly with the pelvis or the femur."),
    _("The abductor capacity (N m per kg) is an assumption taken from young-adult figures, "
      "not measured in this patient."),
  };
  double h = heading (L, _("Assumptions"), y, draw);
  for (size_t i = 0; i < sizeof items / sizeof items[0]; i++)
    {
      wrap_text (L->cr, "\xe2\x80\xa2", content_left (), y + h, 8, TYPE_SMALL * L->s, false,
                 ink, false, draw);
      h += wrap_text (L->cr, items[i], content_left () + 8, y + h, content_width () - 8,
                      TYPE_SMALL * L->s, false, ink, false, draw);
    }
  return h;
}

static double
block_sources (HlLayout *L, double y, bool draw)
{
  const HlPlan *p = L->r->plan;
  const HlLimbTableInfo *limb = hl_limb_table_info (p->model.limb_table);
  char limb_line[512];
  snprintf (limb_line, sizeof limb_line, _("Stance-limb mass fraction: %s."),
            limb != NULL ? limb->source : "");
  const char *items[] = {
    _("Pauwels F 1976, Biomechanics of the Normal and Diseased Hip, Springer: the free-body "
      "method of single-leg stance."),
    limb_line,
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
  double h = heading (L, _("Sources"), y, draw);
  for (size_t i = 0; i < sizeof items / sizeof items[0]; i++)
    {
      char num[8];
      snprintf (num, sizeof num, "%zu.", i + 1);
      wrap_text (L->cr, num, content_left (), y + h, 12, TYPE_SMALL * L->s, false, ink,
                 false, draw);
      h += wrap_text (L->cr, items[i], content_left () + 12, y + h, content_width () - 12,
                      TYPE_SMALL * L->s, false, ink, false, draw);
    }
  return h;
}

/* ---- Flow -------------------------------------------------------------------- */

typedef struct {
  HlBlockFn fn;
  bool new_page;     /* starts page 2 */
} HlBlock;

static const HlBlock blocks[] = {
  { block_title, false },
  { block_caution, false },
  { block_inputs, false },
  { block_landmarks, false },
  { block_options, false },
  { block_results, false },
  { block_mc_note, false },
  { block_flags, false },
  { block_capacity, false },
  { block_inverse, false },
  { block_figure, true },
  { block_charts, false },
  { block_assumptions, false },
  { block_sources, false },
};

static void
draw_running_head (HlLayout *L, bool draw)
{
  if (L->page == 0)
    return;
  char line[256];
  snprintf (line, sizeof line, _("Case: %s (continued)"), L->r->plan->label);
  L->y += wrap_text (L->cr, line, content_left (), L->y, content_width (), TYPE_BODY * L->s,
                     true, ink_soft, false, draw) + 4.0;
}

static void
draw_footer (const HlReport *r, cairo_t *cr, int page)
{
  double y = HL_REPORT_PAGE_HEIGHT_PT - FOOTER_H;
  char right[128];
  set_rgba (cr, rule);
  cairo_set_line_width (cr, 0.6);
  cairo_move_to (cr, content_left (), y);
  cairo_line_to (cr, content_left () + content_width (), y);
  cairo_stroke (cr);
  snprintf (right, sizeof right, _("Page %d of %d"), page + 1, r->n_pages);
  double rw = 70.0;
  wrap_text (cr, hl_caution_short (), content_left (), y + 3, content_width () - rw,
             TYPE_SMALL, true, (HlRgba) { 0.55, 0.2, 0.0, 1.0 }, false, true);
  wrap_text (cr, right, content_left () + content_width () - rw, y + 3, rw, TYPE_SMALL,
             false, ink_soft, true, true);
  char ver[160];
  snprintf (ver, sizeof ver, _("hiplever %s, mechanical model %s"), hl_program_version (),
            HL_MODEL_VERSION);
  wrap_text (cr, ver, content_left () + content_width () - 2 * rw, y + 3 + TYPE_SMALL * 1.4,
             2 * rw, TYPE_SMALL, false, ink_soft, true, true);
}

/* Runs the flow; draws the blocks of page `target` (or none for -1) and
 * returns the number of pages used. */
static int
layout_run (const HlReport *r, cairo_t *cr, double scale, int target)
{
  HlLayout L = { r, cr, scale, 0, target, MARGIN_TOP };

  for (size_t i = 0; i < sizeof blocks / sizeof blocks[0]; i++)
    {
      double h = blocks[i].fn (&L, L.y, false);
      bool at_top = L.y <= MARGIN_TOP + 1e-6;
      if ((blocks[i].new_page && L.page == 0) || (!at_top && L.y + h > page_bottom ()))
        {
          L.page++;
          L.y = MARGIN_TOP;
          draw_running_head (&L, L.page == target);
        }
      if (L.page == target && h > 0.0)
        blocks[i].fn (&L, L.y, true);
      if (h > 0.0)
        L.y += h + BLOCK_GAP * scale;
    }
  return L.page + 1;
}

static int
layout_count_pages (const HlReport *r, double scale)
{
  cairo_surface_t *s = cairo_recording_surface_create (CAIRO_CONTENT_COLOR_ALPHA, NULL);
  cairo_t *cr = cairo_create (s);
  int n = layout_run (r, cr, scale, -1);
  cairo_destroy (cr);
  cairo_surface_destroy (s);
  return n;
}

void
hl_report_draw_page (const HlReport *r, cairo_t *cr, int page)
{
  if (page < 0 || page >= r->n_pages)
    return;
  cairo_save (cr);
  cairo_set_source_rgb (cr, 1.0, 1.0, 1.0);
  cairo_rectangle (cr, 0, 0, HL_REPORT_PAGE_WIDTH_PT, HL_REPORT_PAGE_HEIGHT_PT);
  cairo_fill (cr);
  layout_run (r, cr, r->scale, page);
  draw_footer (r, cr, page);
  cairo_restore (cr);
}

/* ---- Output to memory ----------------------------------------------------------- */

typedef struct {
  unsigned char *data;
  size_t len, cap;
  bool failed;
} HlMemStream;

static cairo_status_t
mem_write_cb (void *closure, const unsigned char *data, unsigned int length)
{
  HlMemStream *m = closure;
  if (m->failed)
    return CAIRO_STATUS_WRITE_ERROR;
  if (m->len + length > m->cap)
    {
      size_t cap = m->cap ? m->cap : 65536;
      while (cap < m->len + length)
        cap *= 2;
      unsigned char *p = realloc (m->data, cap);
      if (p == NULL)
        {
          m->failed = true;
          return CAIRO_STATUS_NO_MEMORY;
        }
      m->data = p;
      m->cap = cap;
    }
  memcpy (m->data + m->len, data, length);
  m->len += length;
  return CAIRO_STATUS_SUCCESS;
}

static HlStatus
finish_stream (cairo_surface_t *surface, HlMemStream *m, const char *what,
               unsigned char **out, size_t *size, HlError *err)
{
  cairo_surface_finish (surface);
  cairo_status_t cs = cairo_surface_status (surface);
  cairo_surface_destroy (surface);
  if (cs != CAIRO_STATUS_SUCCESS || m->failed)
    {
      free (m->data);
      return hl_error_set (err, m->failed || cs == CAIRO_STATUS_NO_MEMORY ? HL_ERR_NOMEM
                                                                          : HL_ERR_IO,
                           what, _("Cannot draw the %s: %s."), what,
                           cairo_status_to_string (cs));
    }
  *out = m->data;
  *size = m->len;
  return HL_OK;
}

HlStatus
hl_report_pdf_to_buffer (const HlReport *r, unsigned char **out, size_t *size, HlError *err)
{
  HlMemStream m = { 0 };
  cairo_surface_t *surface = cairo_pdf_surface_create_for_stream (mem_write_cb, &m,
                                                                  HL_REPORT_PAGE_WIDTH_PT,
                                                                  HL_REPORT_PAGE_HEIGHT_PT);
  char title[HL_LABEL_MAX + 64];
  snprintf (title, sizeof title, _("hiplever planning report: %s"), r->plan->label);
  cairo_pdf_surface_set_metadata (surface, CAIRO_PDF_METADATA_TITLE, title);
  cairo_pdf_surface_set_metadata (surface, CAIRO_PDF_METADATA_CREATOR, "hiplever");
  cairo_pdf_surface_set_metadata (surface, CAIRO_PDF_METADATA_SUBJECT, hl_caution_short ());
  cairo_t *cr = cairo_create (surface);
  layout_out_of_memory = false;
  for (int page = 0; page < r->n_pages; page++)
    {
      hl_report_draw_page (r, cr, page);
      cairo_show_page (cr);
    }
  cairo_destroy (cr);
  HlStatus st = finish_stream (surface, &m, _("report"), out, size, err);
  if (st == HL_OK && layout_out_of_memory)
    {
      free (*out);
      *out = NULL;
      *size = 0;
      st = hl_error_set (err, HL_ERR_NOMEM, "report", "%s",
                         _("There is not enough memory for the report."));
    }
  return st;
}

HlStatus
hl_report_save_pdf (const HlPlan *plan, const HlReportSettings *settings, const char *path,
                    HlError *err)
{
  if (path == NULL || path[0] == '\0')
    return hl_error_set (err, HL_ERR_INVALID, "report path", "%s",
                         _("No file name was given for the report."));
  HlReport *r = hl_report_new (plan, settings, err);
  if (r == NULL)
    return err != NULL && err->status != HL_OK ? err->status : HL_ERR_NOMEM;
  unsigned char *pdf = NULL;
  size_t size = 0;
  HlStatus st = hl_report_pdf_to_buffer (r, &pdf, &size, err);
  hl_report_free (r);
  if (st == HL_OK)
    st = hl_write_file_atomic (path, pdf, size, err);
  free (pdf);
  return st;
}

/* ---- Figures ------------------------------------------------------------------ */

bool
hl_figure_format_from_path (const char *path, HlFigureFormat *format)
{
  const char *dot = path != NULL ? strrchr (path, '.') : NULL;
  if (dot == NULL || strchr (dot, '/') != NULL)
    return false;
  if (strcasecmp (dot, ".png") == 0)
    *format = HL_FIGURE_FORMAT_PNG;
  else if (strcasecmp (dot, ".svg") == 0)
    *format = HL_FIGURE_FORMAT_SVG;
  else
    return false;
  return true;
}

static void
figure_draw (cairo_t *cr, const HlPlan *plan, int option_index, int width, int height,
             HlRenderPreset preset)
{
  hl_render_figure_draw (cr, plan, option_index, width, height, preset, NULL);
}

HlStatus
hl_figure_to_buffer (const HlPlan *plan, int option_index, int width, int height,
                     HlFigureFormat format, unsigned char **out, size_t *size, HlError *err)
{
  return hl_figure_to_buffer_preset (plan, option_index, width, height,
                                     HL_RENDER_PRESET_AUTO, format, out, size, err);
}

HlStatus
hl_figure_to_buffer_preset (const HlPlan *plan, int option_index, int width, int height,
                            HlRenderPreset preset, HlFigureFormat format,
                            unsigned char **out, size_t *size, HlError *err)
{
  hl_render_preset_size (preset, &width, &height);
  if (width < HL_FIGURE_SIZE_MIN || width > HL_FIGURE_SIZE_MAX
      || height < HL_FIGURE_SIZE_MIN || height > HL_FIGURE_SIZE_MAX)
    return hl_error_set (err, HL_ERR_INVALID, "figure size",
                         _("The figure size %d x %d is outside %d to %d px."),
                         width, height, HL_FIGURE_SIZE_MIN, HL_FIGURE_SIZE_MAX);
  if (option_index < -1 || (option_index >= 0 && (size_t) option_index >= plan->n_options))
    return hl_error_set (err, HL_ERR_INVALID, "figure option",
                         _("There is no option %d: the plan has %zu."), option_index + 1,
                         plan->n_options);

  /* A figure of a plan that cannot be solved would show only the reason;
   * an export says so instead. */
  HlScene scene;
  hl_scene_build (&scene, plan, option_index);
  if (!scene.solved)
    {
      if (err != NULL)
        *err = scene.error;
      return scene.error.status != HL_OK ? scene.error.status : HL_ERR_INVALID;
    }

  HlMemStream m = { 0 };
  if (format == HL_FIGURE_FORMAT_SVG)
    {
      cairo_surface_t *surface = cairo_svg_surface_create_for_stream (mem_write_cb, &m,
                                                                      width, height);
      cairo_t *cr = cairo_create (surface);
      figure_draw (cr, plan, option_index, width, height, preset);
      cairo_destroy (cr);
      return finish_stream (surface, &m, _("figure"), out, size, err);
    }

  cairo_surface_t *img = cairo_image_surface_create (CAIRO_FORMAT_RGB24, width, height);
  if (cairo_surface_status (img) != CAIRO_STATUS_SUCCESS)
    {
      cairo_surface_destroy (img);
      return hl_error_set (err, HL_ERR_NOMEM, "figure", "%s",
                           _("There is not enough memory for the figure."));
    }
  cairo_t *cr = cairo_create (img);
  figure_draw (cr, plan, option_index, width, height, preset);
  cairo_destroy (cr);
  cairo_status_t cs = cairo_surface_write_to_png_stream (img, mem_write_cb, &m);
  cairo_surface_destroy (img);
  if (cs != CAIRO_STATUS_SUCCESS || m.failed)
    {
      free (m.data);
      return hl_error_set (err, HL_ERR_NOMEM, "figure", _("Cannot encode the figure: %s."),
                           cairo_status_to_string (cs));
    }
  *out = m.data;
  *size = m.len;
  return HL_OK;
}

HlStatus
hl_figure_save (const HlPlan *plan, int option_index, int width, int height,
                const char *path, HlError *err)
{
  return hl_figure_save_preset (plan, option_index, width, height,
                                HL_RENDER_PRESET_AUTO, path, err);
}

HlStatus
hl_figure_save_preset (const HlPlan *plan, int option_index, int width, int height,
                       HlRenderPreset preset, const char *path, HlError *err)
{
  HlFigureFormat format;
  if (!hl_figure_format_from_path (path, &format))
    return hl_error_set (err, HL_ERR_INVALID, "figure path",
                         _("The file name \"%.200s\" ends neither in .svg nor in .png."),
                         path != NULL ? path : "");
  unsigned char *data = NULL;
  size_t size = 0;
  HlStatus st = hl_figure_to_buffer_preset (plan, option_index, width, height, preset,
                                            format, &data, &size, err);
  if (st == HL_OK)
    st = hl_write_file_atomic (path, data, size, err);
  free (data);
  return st;
}

/* ---- Sweep tables --------------------------------------------------------------- */

HlStatus
hl_report_sweeps_csv (const HlReport *r, char **out, size_t *size, HlError *err)
{
  char *all = NULL;
  size_t all_len = 0;

  for (int k = 0; k < HL_CHART_N; k++)
    {
      char *csv = NULL;
      size_t len = 0;
      HlStatus st = hl_chart_data_to_csv (r->charts[k], r->plan, &csv, &len, err);
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

/* hl-results.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-results"

#include <math.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-measure.h"
#include "hl-buf.h"
#include "hl-result-fields.h"
#include "hl-results.h"

/* A native figure this close to zero has no meaningful change in %. */
#define HL_RESULTS_PERCENT_MIN_BASE 1e-9

/* The quantities shown: the window's fields of the one table of result
 * fields (core/hl-result-fields.h), in its order; filled once. */
typedef HlResultField HlResultRow;
static const HlResultRow *rows[HL_RESULT_FIELD_MAX];
static guint n_rows;

/* Flags come right under the option names, where a warning is seen
 * before the numbers it qualifies. */
#define N_ROWS n_rows
#define HEADER_ROW 0
#define FLAGS_ROW 1
/* Then what a surgeon plans by: leg length and global offset against the
 * other hip, in words and numbers. */
#define AGAINST_LEG_ROW 2
#define AGAINST_GO_ROW 3
#define N_AGAINST_ROWS 2
#define FIRST_VALUE_ROW 4
#define FIRST_COLUMN 2   /* after the quantity and its unit */

/* Monte Carlo rows, each right under the figure it qualifies. */
typedef enum {
  RANGE_ABDUCTOR,
  RANGE_JRF,
  RANGE_SHARE_LOWER,
  N_RANGE_ROWS
} HlRangeRow;

static const struct {
  const char *after;      /* key of the row above */
  const char *label;
  const char *unit;
} range_rows[N_RANGE_ROWS] = {
  { "abductor-force-bw", N_("  5–95% range"), N_("× BW") },
  { "joint-reaction-force-bw", N_("  5–95% range"), N_("× BW") },
  { "joint-reaction-force-bw", N_("  Lower than native in"), /* xgettext:no-c-format */ N_("% of samples") },
};
#define RANGE_DIGITS 2
#define SHARE_DIGITS 0
#define NOTE_ROW (FIRST_VALUE_ROW + (int) (N_ROWS + N_RANGE_ROWS))

typedef struct {
  GtkWidget *header;
  GtkWidget *value[HL_RESULT_FIELD_MAX];
  GtkWidget *change[HL_RESULT_FIELD_MAX];
  GtkWidget *range[N_RANGE_ROWS];
  GtkWidget *flags;          /* a box: the short lines, then the sentences on demand */
  GtkWidget *flags_short;
  GtkWidget *flags_more;     /* an expander */
  GtkWidget *flags_full;
  GtkWidget *against[N_AGAINST_ROWS];
  GtkWidget *error;
} HlResultsColumn;

struct _HlResults {
  GtkWidget parent_instance;

  GtkWidget *grid;
  GArray *columns;   /* of HlResultsColumn */
  GtkWidget *common_error;   /* one message over all columns */
  int selected;      /* option index, -1 none */
  HlMcSummary *ranges;       /* n_ranges columns, NULL: none shown */
  size_t n_ranges;
  gboolean *column_ok;       /* of the last update, for the ranges */
  GtkWidget *range_label[N_RANGE_ROWS];
  GtkWidget *range_unit[N_RANGE_ROWS];
  GtkWidget *range_note;
  HlDocument *document;      /* borrowed */
  gboolean stale;            /* changed while hidden: follows when shown */
};

G_DEFINE_FINAL_TYPE (HlResults, hl_results, GTK_TYPE_WIDGET)

static void refresh_if_stale (HlResults *self);

static char *
format_value (const HlResultRow *row, double v)
{
  if (!isfinite (v))
    return g_strdup (_("not measured"));
  if (row->kind != HL_FIELD_CHANGE)
    return g_strdup_printf ("%.*f", row->decimals, v);
  return g_strdup_printf ("%+.*f", row->decimals, v);
}

static char *
format_change (const HlResultRow *row, double v, double native)
{
  if (row->kind != HL_FIELD_PERCENT || !isfinite (v) || !isfinite (native))
    return g_strdup ("");
  if (fabs (native) < HL_RESULTS_PERCENT_MIN_BASE)
    return g_strdup ("(—)");
  return g_strdup_printf ("(%+.1f%%)", 100.0 * (v - native) / native);
}

/* One short line per flag ("• Global offset reduced"); the reasons and
 * the sources are in the full sentences. */
static char *
format_flags_short (const HlResult *res)
{
  GString *s = g_string_new (NULL);

  for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
    {
      if ((res->flags & bit) == 0)
        continue;
      if (s->len > 0)
        g_string_append_c (s, '\n');
      g_string_append_printf (s, "• %s", hl_flag_short ((HlFlag) bit));
    }
  if (s->len == 0)
    g_string_append (s, _("No flags"));
  return g_string_free (s, FALSE);
}

/* The full sentences, shown when the user opens them. */
static char *
format_flags (const HlResult *res)
{
  GString *s = g_string_new (NULL);
  unsigned flags = res->flags;

  for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
    {
      if ((flags & bit) == 0)
        continue;
      if (s->len > 0)
        g_string_append_c (s, '\n');
      g_string_append_printf (s, "• %s", _(hl_flag_text ((HlFlag) bit)));
      for (unsigned why = 1; bit == HL_FLAG_IMPLAUSIBLE && why != 0
           && why <= HL_IMPLAUSIBLE_LAST; why <<= 1)
        if (res->implausible & why)
          {
            char text[HL_ERROR_MESSAGE_MAX];
            g_string_append_printf (s, "\n  – %s",
                                    hl_implausible_describe (res, (HlImplausible) why,
                                                             text, sizeof text));
          }
    }
  return g_string_free (s, FALSE);
}

static char *
format_error (const HlSolved *s)
{
  const char *msg = s->error.message[0] != '\0'
                    ? s->error.message : hl_status_name (s->status);

  if (s->error.field[0] != '\0')
    return g_strdup_printf (_("Cannot solve: %s (%s)"), msg, s->error.field);
  return g_strdup_printf (_("Cannot solve: %s"), msg);
}

static guint
row_index (const char *key)
{
  for (guint r = 0; r < N_ROWS; r++)
    if (g_str_equal (rows[r]->key, key))
      return r;
  g_return_val_if_reached (N_ROWS - 1);
}

static int
value_row_y (guint r)
{
  int y = FIRST_VALUE_ROW + (int) r;

  for (guint k = 0; k < N_RANGE_ROWS; k++)
    if (row_index (range_rows[k].after) < r)
      y++;
  return y;
}

static int
range_row_y (guint k)
{
  int y = value_row_y (row_index (range_rows[k].after)) + 1;

  for (guint j = 0; j < k; j++)
    if (g_str_equal (range_rows[j].after, range_rows[k].after))
      y++;
  return y;
}

static char *
format_range (const HlMcSummary *s, guint k, gboolean native)
{
  const HlPercentiles *p = k == RANGE_ABDUCTOR ? &s->abductor_force_bw : &s->jrf_bw;

  if (k == RANGE_SHARE_LOWER)
    return native || !isfinite (s->share_lower_jrf)
           ? g_strdup ("") : g_strdup_printf ("%.*f%%", SHARE_DIGITS, 100.0 * s->share_lower_jrf);
  if (!isfinite (p->p05) || !isfinite (p->p95))
    return g_strdup ("");
  return g_strdup_printf ("%.*f–%.*f", RANGE_DIGITS, p->p05, RANGE_DIGITS, p->p95);
}

static void hl_results_show_ranges (HlResults *self);

static GtkWidget *
make_label (const char *css, float xalign)
{
  GtkWidget *label = gtk_label_new (NULL);

  gtk_label_set_xalign (GTK_LABEL (label), xalign);
  if (css != NULL)
    gtk_widget_add_css_class (label, css);
  return label;
}

static void
hl_results_clear_columns (HlResults *self)
{
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);

      gtk_grid_remove (GTK_GRID (self->grid), col->header);
      for (guint r = 0; r < N_ROWS; r++)
        {
          gtk_grid_remove (GTK_GRID (self->grid), col->value[r]);
          gtk_grid_remove (GTK_GRID (self->grid), col->change[r]);
        }
      for (guint k = 0; k < N_RANGE_ROWS; k++)
        gtk_grid_remove (GTK_GRID (self->grid), col->range[k]);
      gtk_grid_remove (GTK_GRID (self->grid), col->flags);
      for (guint k = 0; k < N_AGAINST_ROWS; k++)
        gtk_grid_remove (GTK_GRID (self->grid), col->against[k]);
      gtk_grid_remove (GTK_GRID (self->grid), col->error);
    }
  g_array_set_size (self->columns, 0);
  if (self->common_error != NULL)
    {
      gtk_grid_remove (GTK_GRID (self->grid), self->common_error);
      self->common_error = NULL;
    }
}

static void
hl_results_build_columns (HlResults *self, size_t n)
{
  GtkGrid *grid = GTK_GRID (self->grid);

  hl_results_clear_columns (self);
  for (size_t c = 0; c < n; c++)
    {
      HlResultsColumn col;
      int x = FIRST_COLUMN + 2 * (int) c;

      col.header = make_label ("results-header", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.header), TRUE);
      gtk_label_set_wrap_mode (GTK_LABEL (col.header), PANGO_WRAP_WORD_CHAR);
      gtk_label_set_width_chars (GTK_LABEL (col.header), 12);
      gtk_label_set_max_width_chars (GTK_LABEL (col.header), 18);
      gtk_widget_set_valign (col.header, GTK_ALIGN_END);
      gtk_grid_attach (grid, col.header, x, HEADER_ROW, 2, 1);
      for (guint r = 0; r < N_ROWS; r++)
        {
          col.value[r] = make_label ("results-value", 1.0f);
          gtk_label_set_width_chars (GTK_LABEL (col.value[r]), 7);
          gtk_grid_attach (grid, col.value[r], x, value_row_y (r), 1, 1);
          col.change[r] = make_label ("results-change", 0.0f);
          gtk_label_set_width_chars (GTK_LABEL (col.change[r]), 8);
          gtk_grid_attach (grid, col.change[r], x + 1, value_row_y (r), 1, 1);
        }
      for (guint k = 0; k < N_RANGE_ROWS; k++)
        {
          col.range[k] = make_label ("results-range", 1.0f);
          gtk_widget_add_css_class (col.range[k], "dim-label");
          gtk_grid_attach (grid, col.range[k], x, range_row_y (k), 1, 1);
          gtk_widget_set_visible (col.range[k], FALSE);
        }
      col.flags = gtk_box_new (GTK_ORIENTATION_VERTICAL, 0);
      gtk_widget_add_css_class (col.flags, "results-flags");
      gtk_widget_set_valign (col.flags, GTK_ALIGN_START);
      col.flags_short = make_label (NULL, 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.flags_short), TRUE);
      gtk_label_set_max_width_chars (GTK_LABEL (col.flags_short), 26);
      gtk_box_append (GTK_BOX (col.flags), col.flags_short);
      col.flags_more = gtk_expander_new (_("Why"));
      col.flags_full = make_label ("caption", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.flags_full), TRUE);
      gtk_label_set_max_width_chars (GTK_LABEL (col.flags_full), 26);
      gtk_label_set_selectable (GTK_LABEL (col.flags_full), TRUE);
      gtk_expander_set_child (GTK_EXPANDER (col.flags_more), col.flags_full);
      gtk_box_append (GTK_BOX (col.flags), col.flags_more);
      gtk_grid_attach (grid, col.flags, x, FLAGS_ROW, 2, 1);
      for (guint k = 0; k < N_AGAINST_ROWS; k++)
        {
          col.against[k] = make_label ("results-value", 0.0f);
          gtk_label_set_wrap (GTK_LABEL (col.against[k]), TRUE);
          gtk_label_set_max_width_chars (GTK_LABEL (col.against[k]), 18);
          gtk_grid_attach (grid, col.against[k], x, AGAINST_LEG_ROW + (int) k, 2, 1);
        }
      col.error = make_label ("results-error", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.error), TRUE);
      gtk_label_set_max_width_chars (GTK_LABEL (col.error), 22);
      gtk_widget_set_valign (col.error, GTK_ALIGN_START);
      gtk_grid_attach (grid, col.error, x, FLAGS_ROW, 2,
                       (int) (N_ROWS + N_RANGE_ROWS + N_AGAINST_ROWS) + 1);
      gtk_widget_set_visible (col.error, FALSE);
      g_array_append_val (self->columns, col);
    }
  self->common_error = make_label ("results-error", 0.0f);
  gtk_label_set_wrap (GTK_LABEL (self->common_error), TRUE);
  gtk_widget_set_valign (self->common_error, GTK_ALIGN_START);
  gtk_grid_attach (grid, self->common_error, FIRST_COLUMN, FLAGS_ROW,
                   2 * (int) n, (int) (N_ROWS + N_RANGE_ROWS + N_AGAINST_ROWS) + 1);
  self->column_ok = g_renew (gboolean, self->column_ok, MAX (n, 1));
  /* The note spans the columns there are now. */
  g_object_ref (self->range_note);
  gtk_grid_remove (grid, self->range_note);
  gtk_grid_attach (grid, self->range_note, 0, NOTE_ROW, FIRST_COLUMN + 2 * (int) n, 1);
  g_object_unref (self->range_note);
  gtk_widget_set_visible (self->common_error, FALSE);
  hl_results_set_selected_option (self, self->selected);
}

void
hl_results_update (HlResults *self, const HlPlan *plan, const HlSolved *solved,
                   size_t n)
{
  g_return_if_fail (HL_IS_RESULTS (self));

  gboolean common = n > 0;

  if (self->columns->len != n)
    hl_results_build_columns (self, n);

  /* A plan that cannot be prepared fails every column the same way: say
   * it once across the table. */
  for (size_t c = 0; c < n && common; c++)
    common = solved[c].status != HL_OK
             && strcmp (solved[c].error.message, solved[0].error.message) == 0;
  gtk_widget_set_visible (self->common_error, common);
  if (common)
    {
      g_autofree char *msg = format_error (&solved[0]);

      gtk_label_set_text (GTK_LABEL (self->common_error), msg);
    }

  for (size_t c = 0; c < n; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);
      const HlSolved *s = &solved[c];
      gboolean ok = s->status == HL_OK;

      if (c == 0)
        gtk_label_set_text (GTK_LABEL (col->header), _("Native"));
      else
        gtk_label_set_text (GTK_LABEL (col->header), plan->options[c - 1].name);

      for (guint r = 0; r < N_ROWS; r++)
        {
          gtk_widget_set_visible (col->value[r], ok);
          gtk_widget_set_visible (col->change[r], ok);
          if (!ok)
            continue;

          double v = rows[r]->get (&s->result);
          g_autofree char *value = format_value (rows[r], v);
          g_autofree char *change = NULL;

          if (c > 0 && solved[0].status == HL_OK)
            change = format_change (rows[r], v, rows[r]->get (&solved[0].result));
          gtk_label_set_text (GTK_LABEL (col->value[r]), value);
          gtk_label_set_text (GTK_LABEL (col->change[r]), change != NULL ? change : "");
        }

      /* Leg length and global offset against the other hip: measures of
       * the core on the option's landmarks, in words and numbers. */
      {
        HlLandmarks lm;
        HlMeasures ms;
        char text[2][96], full[2][160];
        if (c == 0)
          lm = plan->landmarks;
        else
          hl_recon_landmarks (plan, &plan->options[c - 1].recon, &lm);
        hl_measure (&lm, plan->side, &ms);
        hl_measure_leg_length_short (ms.leg_length_difference_mm, text[0], sizeof text[0]);
        hl_measure_global_offset_short (ms.global_offset_difference_mm, text[1],
                                        sizeof text[1]);
        hl_measure_leg_length_words (ms.leg_length_difference_mm, full[0], sizeof full[0]);
        hl_measure_global_offset_words (ms.global_offset_difference_mm, full[1],
                                        sizeof full[1]);
        for (guint k = 0; k < N_AGAINST_ROWS; k++)
          {
            gtk_label_set_text (GTK_LABEL (col->against[k]), text[k]);
            gtk_widget_set_tooltip_text (col->against[k], full[k]);
            gtk_accessible_update_property (GTK_ACCESSIBLE (col->against[k]),
                                            GTK_ACCESSIBLE_PROPERTY_LABEL, full[k], -1);
          }
      }

      self->column_ok[c] = ok;
      gtk_widget_set_visible (col->flags, ok);
      gtk_widget_set_visible (col->error, !ok && !common);
      if (ok)
        {
          g_autofree char *flags = format_flags_short (&s->result);
          g_autofree char *full = format_flags (&s->result);

          gtk_label_set_text (GTK_LABEL (col->flags_short), flags);
          gtk_label_set_text (GTK_LABEL (col->flags_full), full);
          gtk_widget_set_visible (col->flags_more, s->result.flags != 0);
          if (s->result.flags != 0)
            gtk_widget_add_css_class (col->flags, "flagged");
          else
            gtk_widget_remove_css_class (col->flags, "flagged");
        }
      else
        {
          g_autofree char *msg = format_error (s);

          gtk_label_set_text (GTK_LABEL (col->error), msg);
        }
    }
  hl_results_show_ranges (self);
}

static void
hl_results_show_ranges (HlResults *self)
{
  gboolean shown = self->ranges != NULL && self->n_ranges == self->columns->len;

  for (guint k = 0; k < N_RANGE_ROWS; k++)
    {
      gtk_widget_set_visible (self->range_label[k], shown);
      gtk_widget_set_visible (self->range_unit[k], shown);
    }
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);

      for (guint k = 0; k < N_RANGE_ROWS; k++)
        {
          g_autofree char *text = NULL;
          gboolean visible = shown && self->column_ok[c];

          gtk_widget_set_visible (col->range[k], visible);
          if (!visible)
            continue;
          text = format_range (&self->ranges[c], k, c == 0);
          gtk_label_set_text (GTK_LABEL (col->range[k]), text);
        }
    }
}

void
hl_results_set_ranges (HlResults *self, const HlMcSummary *ranges, size_t n,
                       const char *note)
{
  g_return_if_fail (HL_IS_RESULTS (self));

  g_clear_pointer (&self->ranges, g_free);
  self->n_ranges = 0;
  if (ranges != NULL && n > 0)
    {
      self->ranges = g_memdup2 (ranges, n * sizeof *ranges);
      self->n_ranges = n;
    }
  gtk_label_set_text (GTK_LABEL (self->range_note), note != NULL ? note : "");
  gtk_widget_set_visible (self->range_note, note != NULL && note[0] != '\0');
  hl_results_show_ranges (self);
}

char *
hl_results_format_ranges_csv (HlResults *self)
{
  static const char *const keys[] = {
    "abductor-force-bw-p05", "abductor-force-bw-p95",
    "joint-reaction-force-bw-p05", "joint-reaction-force-bw-p95",
  };
  GString *s = g_string_new (NULL);

  g_return_val_if_fail (HL_IS_RESULTS (self), NULL);
  refresh_if_stale (self);
  if (self->ranges == NULL || self->n_ranges != self->columns->len)
    return g_string_free (s, FALSE);
  for (guint k = 0; k < G_N_ELEMENTS (keys); k++)
    {
      g_string_append_printf (s, "%s,", keys[k]);
      hl_csv_field_append (s, _("× BW"));
      for (size_t c = 0; c < self->n_ranges; c++)
        {
          const HlMcSummary *m = &self->ranges[c];
          const HlPercentiles *p = k < 2 ? &m->abductor_force_bw : &m->jrf_bw;
          double v = k % 2 == 0 ? p->p05 : p->p95;

          g_string_append_c (s, ',');
          if (self->column_ok[c] && isfinite (v))
            {
              g_autofree char *cell = g_strdup_printf ("%.*f", RANGE_DIGITS, v);

              hl_csv_field_append (s, cell);
            }
        }
      g_string_append_c (s, '\n');
    }
  g_string_append (s, "lower-jrf-than-native,%");
  for (size_t c = 0; c < self->n_ranges; c++)
    {
      double v = self->ranges[c].share_lower_jrf;

      g_string_append_c (s, ',');
      if (c > 0 && self->column_ok[c] && isfinite (v))
        {
          g_autofree char *cell = g_strdup_printf ("%.*f", SHARE_DIGITS, 100.0 * v);

          hl_csv_field_append (s, cell);
        }
    }
  g_string_append_c (s, '\n');
  return g_string_free (s, FALSE);
}

static void
document_changed_cb (HlDocument *document, guint what, HlResults *self)
{
  /* Hidden behind the charts: hundreds of labels need not follow a drag. */
  if (!gtk_widget_get_mapped (GTK_WIDGET (self)))
    {
      self->stale = TRUE;
      return;
    }
  self->stale = FALSE;
  if (what & (HL_DOCUMENT_CHANGED_RESULTS | HL_DOCUMENT_CHANGED_OPTIONS))
    {
      size_t n;
      const HlSolved *solved = hl_document_get_solved (document, &n);

      hl_results_update (self, hl_document_get_plan (document), solved, n);
    }
  if (what & (HL_DOCUMENT_CHANGED_RESULTS | HL_DOCUMENT_CHANGED_ANALYSIS))
    {
      const char *note;
      size_t n;
      const HlMcSummary *ranges = hl_document_get_ranges (document, &n, &note, NULL);

      hl_results_set_ranges (self, ranges, n, note);
    }
  if (what & (HL_DOCUMENT_CHANGED_SELECTION | HL_DOCUMENT_CHANGED_RESULTS))
    hl_results_set_selected_option (self, hl_document_get_selected_option (document));
}

void
hl_results_set_document (HlResults *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_RESULTS (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  self->document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  self->stale = TRUE;
}

static void
refresh_if_stale (HlResults *self)
{
  if (self->stale && self->document != NULL)
    {
      self->stale = FALSE;
      hl_results_update (self, hl_document_get_plan (self->document),
                         hl_document_get_solved (self->document, NULL),
                         1 + hl_document_get_plan (self->document)->n_options);
      {
        const char *note;
        size_t n;
        const HlMcSummary *ranges = hl_document_get_ranges (self->document, &n, &note, NULL);

        hl_results_set_ranges (self, ranges, n, note);
      }
      hl_results_set_selected_option (self, hl_document_get_selected_option (self->document));
    }
}

static void
hl_results_map (GtkWidget *widget)
{
  GTK_WIDGET_CLASS (hl_results_parent_class)->map (widget);
  refresh_if_stale (HL_RESULTS (widget));
}

void
hl_results_set_selected_option (HlResults *self, int index)
{
  g_return_if_fail (HL_IS_RESULTS (self));

  self->selected = index;
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);

      if ((int) c - 1 == index)
        gtk_widget_add_css_class (col->header, "selected-column");
      else
        gtk_widget_remove_css_class (col->header, "selected-column");
    }
}

char *
hl_results_format_csv (const HlPlan *plan, const HlSolved *solved, size_t n)
{
  GString *s = g_string_new ("quantity,unit,native");

  for (size_t c = 1; c < n; c++)
    {
      g_string_append_c (s, ',');
      hl_csv_field_append (s, plan->options[c - 1].name);
    }
  g_string_append_c (s, '\n');

  for (guint r = 0; r < N_ROWS; r++)
    {
      g_string_append_printf (s, "%s,", rows[r]->key);
      hl_csv_field_append (s, rows[r]->unit);
      for (size_t c = 0; c < n; c++)
        {
          g_autofree char *cell = NULL;

          g_string_append_c (s, ',');
          if (solved[c].status != HL_OK)
            continue;
          cell = format_value (rows[r], rows[r]->get (&solved[c].result));
          hl_csv_field_append (s, cell);
        }
      g_string_append_c (s, '\n');
    }

  g_string_append (s, "flags,");
  for (size_t c = 0; c < n; c++)
    {
      char buf[256];

      g_string_append_c (s, ',');
      if (solved[c].status == HL_OK)
        hl_csv_field_append (s, hl_flags_format (solved[c].result.flags, ";",
                                              buf, sizeof buf));
    }
  g_string_append (s, "\nerror,");
  for (size_t c = 0; c < n; c++)
    {
      g_string_append_c (s, ',');
      if (solved[c].status != HL_OK)
        {
          g_autofree char *msg = format_error (&solved[c]);

          hl_csv_field_append (s, msg);
        }
    }
  g_string_append_c (s, '\n');
  return g_string_free (s, FALSE);
}

static void
hl_results_dispose (GObject *object)
{
  HlResults *self = HL_RESULTS (object);

  g_clear_pointer (&self->grid, gtk_widget_unparent);
  G_OBJECT_CLASS (hl_results_parent_class)->dispose (object);
}

static void
hl_results_finalize (GObject *object)
{
  HlResults *self = HL_RESULTS (object);

  g_array_unref (self->columns);
  g_free (self->ranges);
  g_free (self->column_ok);
  G_OBJECT_CLASS (hl_results_parent_class)->finalize (object);
}

static void
hl_results_class_init (HlResultsClass *klass)
{
  n_rows = (guint) hl_result_fields_for (HL_OUT_WINDOW, rows);
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = hl_results_dispose;
  object_class->finalize = hl_results_finalize;
  widget_class->map = hl_results_map;
  gtk_widget_class_set_layout_manager_type (widget_class, GTK_TYPE_BIN_LAYOUT);
  gtk_widget_class_set_css_name (widget_class, "hlresults");
}

static void
hl_results_init (HlResults *self)
{
  GtkGrid *grid;

  self->columns = g_array_new (FALSE, TRUE, sizeof (HlResultsColumn));
  self->selected = -1;
  self->grid = gtk_grid_new ();
  grid = GTK_GRID (self->grid);
  gtk_grid_set_column_spacing (grid, 6);
  gtk_grid_set_row_spacing (grid, 2);
  gtk_widget_set_parent (self->grid, GTK_WIDGET (self));

  for (guint r = 0; r < N_ROWS; r++)
    {
      GtkWidget *label = make_label ("results-quantity", 0.0f);
      GtkWidget *unit = make_label ("results-unit", 0.0f);

      gtk_label_set_text (GTK_LABEL (label), _(rows[r]->name));
      gtk_label_set_text (GTK_LABEL (unit), rows[r]->unit[0] != '\0' ? _(rows[r]->unit) : "");
      gtk_grid_attach (grid, label, 0, value_row_y (r), 1, 1);
      gtk_grid_attach (grid, unit, 1, value_row_y (r), 1, 1);
    }
  for (guint k = 0; k < N_RANGE_ROWS; k++)
    {
      GtkWidget *label = make_label ("results-quantity", 0.0f);
      GtkWidget *unit = make_label ("results-unit", 0.0f);

      gtk_label_set_text (GTK_LABEL (label), _(range_rows[k].label));
      gtk_label_set_text (GTK_LABEL (unit), _(range_rows[k].unit));
      gtk_widget_add_css_class (label, "dim-label");
      gtk_grid_attach (grid, label, 0, range_row_y (k), 1, 1);
      gtk_grid_attach (grid, unit, 1, range_row_y (k), 1, 1);
      gtk_widget_set_visible (label, FALSE);
      gtk_widget_set_visible (unit, FALSE);
      self->range_label[k] = label;
      self->range_unit[k] = unit;
    }
  self->range_note = make_label ("results-note", 0.0f);
  gtk_label_set_wrap (GTK_LABEL (self->range_note), TRUE);
  gtk_label_set_max_width_chars (GTK_LABEL (self->range_note), 90);
  gtk_widget_add_css_class (self->range_note, "dim-label");
  gtk_widget_add_css_class (self->range_note, "caption");
  gtk_grid_attach (grid, self->range_note, 0, NOTE_ROW, FIRST_COLUMN, 1);
  gtk_widget_set_visible (self->range_note, FALSE);
  {
    GtkWidget *label = make_label ("results-quantity", 0.0f);

    gtk_label_set_text (GTK_LABEL (label), _("Flags"));
    gtk_widget_set_valign (label, GTK_ALIGN_START);
    gtk_grid_attach (grid, label, 0, FLAGS_ROW, 2, 1);
  }
  {
    static const char *const against[N_AGAINST_ROWS] = {
      N_("Operated leg against the other"),
      N_("Global offset against the other side"),
    };
    for (guint k = 0; k < N_AGAINST_ROWS; k++)
      {
        GtkWidget *label = make_label ("results-quantity", 0.0f);
        gtk_label_set_text (GTK_LABEL (label), _(against[k]));
        gtk_grid_attach (grid, label, 0, AGAINST_LEG_ROW + (int) k, 2, 1);
      }
  }
}

GtkWidget *
hl_results_new (void)
{
  return g_object_new (HL_TYPE_RESULTS, NULL);
}

/* hl-results.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-results"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-measure.h"
#include "hl-text.h"
#include "hl-result-fields.h"
#include "hl-results.h"

/* A native figure this close to zero has no meaningful change in %. */
#define HL_RESULTS_PERCENT_MIN_BASE 1e-9

/* The quantities shown: the window's fields of the one table of result
 * fields (core/hl-result-fields.h), in its order; filled once. */
typedef HlResultField HlResultRow;
static const HlResultRow *rows[HL_RESULT_FIELD_MAX];
static guint n_rows;

/* The table is four parts: the option names (a grid) over the body, the
 * quantity names (a grid) left of it and the heading in the corner.  Only
 * the body scrolls; the option names follow its horizontal adjustment and
 * the quantity names its vertical one, so both stay in view.  The body is
 * one vertical box of rows per option column: an option's name shares the
 * width of its column's box (one size group of two per column), and each
 * row's box in every column shares its height with the quantity's name
 * (one size group per row).  No cell in a row wraps, so a row's height
 * does not depend on the width it is measured for, and a figure that
 * changes during a drag re-measures only boxes whose children kept their
 * sizes (with a size group per column over every cell, each change laid
 * out the whole column again: about 2 ms more per frame).  Body rows, top to bottom: the flags, right under the
 * option names, where a warning is seen before the numbers it qualifies;
 * then what a surgeon plans by: leg length and global offset against the
 * other hip, in words and numbers; then the quantities. */
#define N_ROWS n_rows
#define FLAGS_ROW 0
#define AGAINST_LEG_ROW 1
#define AGAINST_GO_ROW 2
#define N_AGAINST_ROWS 2
#define FIRST_VALUE_ROW 3

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
#define N_BODY_ROWS (FIRST_VALUE_ROW + (int) (N_ROWS + N_RANGE_ROWS))
#define MAX_BODY_ROWS (FIRST_VALUE_ROW + HL_RESULT_FIELD_MAX + N_RANGE_ROWS)

/* Between the columns and between the rows, px. */
#define COLUMN_SPACING 12
#define ROW_SPACING 2

/* The body's smallest height, px: a few rows stay readable in a short pane. */
#define BODY_MIN_HEIGHT 90

typedef struct {
  GtkSizeGroup *width;       /* the column: header and every cell */
  GtkSizeGroup *number;      /* the figures and their ranges, right-aligned */
  GtkWidget *header;
  GtkWidget *cell[HL_RESULT_FIELD_MAX];   /* value and change side by side */
  GtkWidget *value[HL_RESULT_FIELD_MAX];
  GtkWidget *change[HL_RESULT_FIELD_MAX];
  GtkWidget *range[N_RANGE_ROWS];
  GtkWidget *range_cell[N_RANGE_ROWS];   /* the box holding it */
  GtkWidget *column;         /* an overlay: the rows, and over them the error */
  GtkWidget *rows;           /* a vertical box of the column's rows */
  GtkWidget *slot[MAX_BODY_ROWS];        /* each row's box in it */
  GtkWidget *flags;          /* a box: "No flags", or the short lines as a button */
  GtkWidget *flags_none;     /* "No flags" */
  GtkWidget *flags_short;    /* one line per flag, the child of: */
  GtkWidget *flags_more;     /* a menu button: the full sentences in a popover */
  GtkWidget *flags_full;
  GtkWidget *against[N_AGAINST_ROWS];
  GtkWidget *error;
} HlResultsColumn;

struct _HlResults {
  GtkWidget parent_instance;

  GtkWidget *layout;         /* the outer grid */
  GtkWidget *header_grid;    /* option names, scrolled with the body's x */
  GtkWidget *names_grid;     /* quantity names and units, with the body's y */
  GtkWidget *body_box;       /* the columns side by side */
  GtkWidget *header_scroll;
  GtkWidget *names_scroll;
  GtkWidget *body_scroll;
  GtkSizeGroup *row_group[MAX_BODY_ROWS];
  GtkWidget *row_name[MAX_BODY_ROWS];     /* the name of each body row */
  GArray *columns;   /* of HlResultsColumn */
  GtkWidget *common_error;   /* one message over all columns */
  int selected;      /* option index, -1 none */
  HlMcSummary *ranges;       /* n_ranges columns, NULL: none shown */
  size_t n_ranges;
  gboolean *column_ok;       /* of the last update, for the ranges */
  GtkWidget *range_label[N_RANGE_ROWS];   /* names of the range rows */
  GtkWidget *range_note;
  HlDocument *document;      /* borrowed */
  gboolean stale;            /* changed while hidden: follows when shown */
};

G_DEFINE_FINAL_TYPE (HlResults, hl_results, GTK_TYPE_WIDGET)

enum {
  SIGNAL_VIEW_CHANGED,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

static void
view_changed_cb (HlResults *self)
{
  g_signal_emit (self, signals[SIGNAL_VIEW_CHANGED], 0);
}

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

/* Sets a label's text only when it changes: an unchanged label is not
 * measured again, and a drag changes few of them. */
static void
set_text (GtkWidget *label, const char *text)
{
  if (g_strcmp0 (gtk_label_get_text (GTK_LABEL (label)), text) != 0)
    gtk_label_set_text (GTK_LABEL (label), text);
}

static void
hl_results_clear_columns (HlResults *self)
{
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);

      gtk_grid_remove (GTK_GRID (self->header_grid), gtk_widget_get_parent (col->header));
      gtk_box_remove (GTK_BOX (self->body_box), col->column);
      g_object_unref (col->width);
      g_object_unref (col->number);
    }
  g_array_set_size (self->columns, 0);
}

/* A box around one widget.  Only such boxes join the size groups: a
 * group re-measures all its members when one changes, and a box is
 * measured again from its child's kept size, where a label would lay out
 * its text again. */
static GtkWidget *
wrap (GtkWidget *child)
{
  GtkWidget *box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 0);

  gtk_box_append (GTK_BOX (box), child);
  return box;
}

/* A body cell of column `col` in body row `y`: in the row's box of the
 * column, which keeps the row's height when the cell is hidden. */
static void
attach_cell (HlResultsColumn *col, GtkWidget *cell, int y)
{
  gtk_box_append (GTK_BOX (col->slot[y]), cell);
}

/* The error of a column that could not be solved: from its first figure's
 * row down. */
static gboolean
error_position_cb (GtkOverlay *overlay, GtkWidget *child, GdkRectangle *allocation,
                   gpointer first_row)
{
  graphene_rect_t b;
  int w = gtk_widget_get_width (GTK_WIDGET (overlay));
  int h = gtk_widget_get_height (GTK_WIDGET (overlay));

  if (!gtk_widget_compute_bounds (GTK_WIDGET (first_row), GTK_WIDGET (overlay), &b))
    return FALSE;
  allocation->x = 0;
  allocation->y = (int) b.origin.y;
  allocation->width = w;
  allocation->height = MAX (h - allocation->y, 1);
  return TRUE;
}

static void
hl_results_build_columns (HlResults *self, size_t n)
{
  hl_results_clear_columns (self);
  for (size_t c = 0; c < n; c++)
    {
      HlResultsColumn col;
      int x = (int) c;

      /* The column is one box of rows, as wide as its widest cell; the
       * option's name shares its width.  Each row's box shares its height
       * with the quantity's name and the row's other columns. */
      col.width = gtk_size_group_new (GTK_SIZE_GROUP_HORIZONTAL);
      col.rows = gtk_box_new (GTK_ORIENTATION_VERTICAL, ROW_SPACING);
      col.column = gtk_overlay_new ();
      gtk_overlay_set_child (GTK_OVERLAY (col.column), col.rows);
      gtk_size_group_add_widget (col.width, col.column);
      for (int y = 0; y < N_BODY_ROWS; y++)
        {
          col.slot[y] = gtk_box_new (GTK_ORIENTATION_VERTICAL, 0);
          gtk_size_group_add_widget (self->row_group[y], col.slot[y]);
          /* Shown and hidden with the row's name (the ranges' rows). */
          g_object_bind_property (self->row_name[y], "visible", col.slot[y], "visible",
                                  G_BINDING_SYNC_CREATE);
          gtk_box_append (GTK_BOX (col.rows), col.slot[y]);
        }
      gtk_box_append (GTK_BOX (self->body_box), col.column);
      col.number = gtk_size_group_new (GTK_SIZE_GROUP_HORIZONTAL);
      col.header = make_label ("results-header", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.header), TRUE);
      gtk_label_set_wrap_mode (GTK_LABEL (col.header), PANGO_WRAP_WORD_CHAR);
      gtk_label_set_width_chars (GTK_LABEL (col.header), 12);
      gtk_label_set_max_width_chars (GTK_LABEL (col.header), 18);
      {
        GtkWidget *box = wrap (col.header);

        gtk_widget_set_valign (box, GTK_ALIGN_END);
        gtk_size_group_add_widget (col.width, box);
        gtk_grid_attach (GTK_GRID (self->header_grid), box, x, 0, 1, 1);
      }
      for (guint r = 0; r < N_ROWS; r++)
        {
          col.cell[r] = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
          col.value[r] = make_label ("results-value", 1.0f);
          gtk_label_set_width_chars (GTK_LABEL (col.value[r]), 7);
          {
            GtkWidget *box = wrap (col.value[r]);

            gtk_size_group_add_widget (col.number, box);
            gtk_box_append (GTK_BOX (col.cell[r]), box);
          }
          col.change[r] = make_label ("results-change", 0.0f);
          gtk_label_set_width_chars (GTK_LABEL (col.change[r]), 8);
          gtk_box_append (GTK_BOX (col.cell[r]), col.change[r]);
          attach_cell (&col, col.cell[r], value_row_y (r));
        }
      for (guint k = 0; k < N_RANGE_ROWS; k++)
        {
          /* In a box of its own: a widget in two groups of one
           * orientation, one inside the other's member, never ends. */
          col.range_cell[k] = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 0);
          col.range[k] = make_label ("results-range", 1.0f);
          gtk_widget_add_css_class (col.range[k], "dim-label");
          {
            GtkWidget *box = wrap (col.range[k]);

            gtk_size_group_add_widget (col.number, box);
            gtk_box_append (GTK_BOX (col.range_cell[k]), box);
          }
          attach_cell (&col, col.range_cell[k], range_row_y (k));
          gtk_widget_set_visible (col.range_cell[k], FALSE);
        }
      col.flags = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 0);
      gtk_widget_add_css_class (col.flags, "results-flags");
      col.flags_none = make_label (NULL, 0.0f);
      gtk_label_set_text (GTK_LABEL (col.flags_none), _("No flags"));
      gtk_widget_set_valign (col.flags_none, GTK_ALIGN_START);
      gtk_box_append (GTK_BOX (col.flags), col.flags_none);
      /* The short lines are a button: a click or Enter, not a hover,
       * shows the full sentences with their reasons. */
      col.flags_short = make_label (NULL, 0.0f);
      col.flags_full = make_label ("results-flags-full", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.flags_full), TRUE);
      gtk_label_set_max_width_chars (GTK_LABEL (col.flags_full), 48);
      col.flags_more = gtk_menu_button_new ();
      gtk_menu_button_set_child (GTK_MENU_BUTTON (col.flags_more), col.flags_short);
      gtk_menu_button_set_always_show_arrow (GTK_MENU_BUTTON (col.flags_more), TRUE);
      gtk_widget_add_css_class (col.flags_more, "flat");
      gtk_widget_set_tooltip_text (col.flags_more,
                                   _("Click for the flags in full sentences, with their reasons"));
      {
        GtkWidget *popover = gtk_popover_new ();

        gtk_popover_set_child (GTK_POPOVER (popover), col.flags_full);
        gtk_menu_button_set_popover (GTK_MENU_BUTTON (col.flags_more), popover);
        g_signal_connect_object (popover, "notify::visible", G_CALLBACK (view_changed_cb),
                                 self, G_CONNECT_SWAPPED);
      }
      gtk_box_append (GTK_BOX (col.flags), col.flags_more);
      attach_cell (&col, col.flags, FLAGS_ROW);
      for (guint k = 0; k < N_AGAINST_ROWS; k++)
        {
          col.against[k] = make_label ("results-value", 0.0f);
          attach_cell (&col, wrap (col.against[k]), AGAINST_LEG_ROW + (int) k);
        }
      /* Over the column's figures (hidden then), from the first one
       * down, without changing any row's height; leg length and offset
       * against the other side come from the landmarks and stay. */
      col.error = make_label ("results-error", 0.0f);
      gtk_label_set_wrap (GTK_LABEL (col.error), TRUE);
      gtk_label_set_max_width_chars (GTK_LABEL (col.error), 22);
      gtk_label_set_yalign (GTK_LABEL (col.error), 0.0f);
      {
        GtkWidget *box = wrap (col.error);

        gtk_overlay_add_overlay (GTK_OVERLAY (col.column), box);
        g_signal_connect (col.column, "get-child-position",
                          G_CALLBACK (error_position_cb), col.slot[FIRST_VALUE_ROW]);
        gtk_widget_set_visible (box, FALSE);
      }
      g_array_append_val (self->columns, col);
    }
  self->column_ok = g_renew (gboolean, self->column_ok, MAX (n, 1));
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

      set_text (self->common_error, msg);
    }

  for (size_t c = 0; c < n; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);
      const HlSolved *s = &solved[c];
      gboolean ok = s->status == HL_OK;

      set_text (col->header, c == 0 ? _("Native") : plan->options[c - 1].name);

      for (guint r = 0; r < N_ROWS; r++)
        {
          gtk_widget_set_visible (col->cell[r], ok);
          if (!ok)
            continue;

          double v = rows[r]->get (&s->result);
          g_autofree char *value = format_value (rows[r], v);
          g_autofree char *change = NULL;

          if (c > 0 && solved[0].status == HL_OK)
            change = format_change (rows[r], v, rows[r]->get (&solved[0].result));
          set_text (col->value[r], value);
          set_text (col->change[r], change != NULL ? change : "");
        }

      /* Leg length and global offset against the other hip: measures of
       * the core on the option's landmarks, in words and numbers. */
      {
        HlMeasures ms;
        char text[2][96], full[2][160];
        hl_row_measures (plan, (size_t) c, &ms);
        hl_measure_leg_length_short (ms.leg_length_difference_mm, text[0], sizeof text[0]);
        hl_measure_global_offset_short (ms.global_offset_difference_mm, text[1],
                                        sizeof text[1]);
        hl_measure_leg_length_words (ms.leg_length_difference_mm, full[0], sizeof full[0]);
        hl_measure_global_offset_words (ms.global_offset_difference_mm, full[1],
                                        sizeof full[1]);
        for (guint k = 0; k < N_AGAINST_ROWS; k++)
          {
            if (g_strcmp0 (gtk_label_get_text (GTK_LABEL (col->against[k])), text[k]) == 0)
              continue;
            set_text (col->against[k], text[k]);
            gtk_widget_set_tooltip_text (col->against[k], full[k]);
            gtk_accessible_update_property (GTK_ACCESSIBLE (col->against[k]),
                                            GTK_ACCESSIBLE_PROPERTY_LABEL, full[k], -1);
          }
      }

      self->column_ok[c] = ok;
      gtk_widget_set_visible (col->flags, ok);
      gtk_widget_set_visible (gtk_widget_get_parent (col->error), !ok && !common);
      if (ok)
        {
          g_autofree char *flags = format_flags_short (&s->result);
          g_autofree char *full = format_flags (&s->result);

          if (g_strcmp0 (gtk_label_get_text (GTK_LABEL (col->flags_short)), flags) != 0)
            {
              g_autofree char *name = g_strdup_printf (_("%s. Show the full sentences"), flags);

              set_text (col->flags_short, flags);
              gtk_accessible_update_property (GTK_ACCESSIBLE (col->flags_more),
                                              GTK_ACCESSIBLE_PROPERTY_LABEL, name, -1);
            }
          set_text (col->flags_full, full);
          gtk_widget_set_visible (col->flags_more, s->result.flags != 0);
          gtk_widget_set_visible (col->flags_none, s->result.flags == 0);
          if (s->result.flags != 0)
            gtk_widget_add_css_class (col->flags, "flagged");
          else
            gtk_widget_remove_css_class (col->flags, "flagged");
        }
      else
        {
          g_autofree char *msg = format_error (s);

          set_text (col->error, msg);
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
    }
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);

      for (guint k = 0; k < N_RANGE_ROWS; k++)
        {
          g_autofree char *text = NULL;
          gboolean visible = shown && self->column_ok[c];

          gtk_widget_set_visible (col->range_cell[k], visible);
          if (!visible)
            continue;
          text = format_range (&self->ranges[c], k, c == 0);
          set_text (col->range[k], text);
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
  gtk_widget_set_tooltip_text (self->range_note, note);
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

  if (self->columns != NULL)
    hl_results_clear_columns (self);
  g_clear_pointer (&self->layout, gtk_widget_unparent);
  for (int y = 0; y < MAX_BODY_ROWS; y++)
    g_clear_object (&self->row_group[y]);
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

  /* The table scrolled, or the full sentences of a column's flags were
   * shown or hidden. */
  signals[SIGNAL_VIEW_CHANGED] =
    g_signal_new ("view-changed", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                  0, NULL, NULL, NULL, G_TYPE_NONE, 0);
}

/* The name of body row `y` (spanning the unit column when `unit` is
 * NULL), in a box that shares its height with the row's boxes in the
 * columns. */
static GtkWidget *
add_row_name (HlResults *self, int y, const char *name, const char *unit, gboolean dim)
{
  GtkWidget *label = make_label ("results-quantity", 0.0f);
  GtkWidget *box = wrap (label);

  gtk_label_set_text (GTK_LABEL (label), name);
  if (dim)
    gtk_widget_add_css_class (label, "dim-label");
  gtk_size_group_add_widget (self->row_group[y], box);
  gtk_grid_attach (GTK_GRID (self->names_grid), box, 0, y, unit != NULL ? 1 : 2, 1);
  label = box;     /* the row's name from here on: shown and hidden whole */
  if (unit != NULL)
    {
      GtkWidget *u = make_label ("results-unit", 0.0f);

      gtk_label_set_text (GTK_LABEL (u), unit);
      gtk_label_set_yalign (GTK_LABEL (u), 0.0f);
      gtk_widget_set_valign (u, GTK_ALIGN_START);
      if (dim)
        gtk_widget_add_css_class (u, "dim-label");
      gtk_grid_attach (GTK_GRID (self->names_grid), u, 1, y, 1, 1);
      g_object_bind_property (label, "visible", u, "visible", G_BINDING_SYNC_CREATE);
    }
  self->row_name[y] = label;
  return label;
}

static GtkWidget *
new_grid (void)
{
  GtkWidget *grid = gtk_grid_new ();

  gtk_grid_set_column_spacing (GTK_GRID (grid), COLUMN_SPACING);
  gtk_grid_set_row_spacing (GTK_GRID (grid), ROW_SPACING);
  return grid;
}

static void
hl_results_init (HlResults *self)
{
  GtkGrid *layout;
  GtkWidget *corner;

  self->columns = g_array_new (FALSE, TRUE, sizeof (HlResultsColumn));
  self->selected = -1;
  for (int y = 0; y < N_BODY_ROWS; y++)
    self->row_group[y] = gtk_size_group_new (GTK_SIZE_GROUP_VERTICAL);

  self->layout = gtk_grid_new ();
  layout = GTK_GRID (self->layout);
  gtk_grid_set_column_spacing (layout, 12);
  gtk_grid_set_row_spacing (layout, 4);
  gtk_widget_set_parent (self->layout, GTK_WIDGET (self));

  self->header_grid = new_grid ();
  self->names_grid = new_grid ();
  gtk_grid_set_column_spacing (GTK_GRID (self->names_grid), 6);
  self->body_box = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, COLUMN_SPACING);
  gtk_widget_set_valign (self->body_box, GTK_ALIGN_START);
  gtk_widget_set_valign (self->names_grid, GTK_ALIGN_START);

  self->body_scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_policy (GTK_SCROLLED_WINDOW (self->body_scroll),
                                  GTK_POLICY_AUTOMATIC, GTK_POLICY_AUTOMATIC);
  gtk_scrolled_window_set_min_content_height (GTK_SCROLLED_WINDOW (self->body_scroll),
                                              BODY_MIN_HEIGHT);
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (self->body_scroll), self->body_box);
  gtk_widget_set_hexpand (self->body_scroll, TRUE);
  gtk_widget_set_vexpand (self->body_scroll, TRUE);
  gtk_widget_add_css_class (self->body_scroll, "results-body");
  for (int o = 0; o < 2; o++)
    g_signal_connect_object (hl_results_get_adjustment (self, (GtkOrientation) o), "value-changed",
                             G_CALLBACK (view_changed_cb), self, G_CONNECT_SWAPPED);

  /* The option names move sideways with the body, never up or down. */
  self->header_scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_policy (GTK_SCROLLED_WINDOW (self->header_scroll),
                                  GTK_POLICY_EXTERNAL, GTK_POLICY_NEVER);
  gtk_scrolled_window_set_hadjustment (GTK_SCROLLED_WINDOW (self->header_scroll),
                                       gtk_scrolled_window_get_hadjustment (GTK_SCROLLED_WINDOW (self->body_scroll)));
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (self->header_scroll), self->header_grid);
  gtk_widget_add_css_class (self->header_scroll, "results-header-row");

  /* The quantity names move up and down with the body, never sideways. */
  self->names_scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_policy (GTK_SCROLLED_WINDOW (self->names_scroll),
                                  GTK_POLICY_NEVER, GTK_POLICY_EXTERNAL);
  gtk_scrolled_window_set_vadjustment (GTK_SCROLLED_WINDOW (self->names_scroll),
                                       gtk_scrolled_window_get_vadjustment (GTK_SCROLLED_WINDOW (self->body_scroll)));
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (self->names_scroll), self->names_grid);
  gtk_widget_set_vexpand (self->names_scroll, TRUE);
  gtk_widget_add_css_class (self->names_scroll, "results-names");

  /* What the table shows, over the quantity names, left of the options. */
  corner = make_label ("heading", 0.0f);
  gtk_label_set_text (GTK_LABEL (corner),
                      _("Results: static single-leg stance, change against native in brackets"));
  gtk_label_set_wrap (GTK_LABEL (corner), TRUE);
  gtk_label_set_max_width_chars (GTK_LABEL (corner), 20);
  gtk_label_set_yalign (GTK_LABEL (corner), 1.0f);
  gtk_grid_attach (layout, corner, 0, 0, 1, 1);
  gtk_grid_attach (layout, self->header_scroll, 1, 0, 1, 1);
  /* A plan that no column can solve: one message over all of them. */
  self->common_error = make_label ("results-error", 0.0f);
  gtk_label_set_wrap (GTK_LABEL (self->common_error), TRUE);
  gtk_label_set_max_width_chars (GTK_LABEL (self->common_error), 60);
  gtk_grid_attach (layout, self->common_error, 1, 1, 1, 1);
  gtk_widget_set_visible (self->common_error, FALSE);
  gtk_grid_attach (layout, self->names_scroll, 0, 2, 1, 1);
  gtk_grid_attach (layout, self->body_scroll, 1, 2, 1, 1);
  /* At most two lines under the table (the whole note in its tooltip),
   * so the figures keep the height. */
  self->range_note = make_label ("results-note", 0.0f);
  gtk_label_set_wrap (GTK_LABEL (self->range_note), TRUE);
  gtk_label_set_ellipsize (GTK_LABEL (self->range_note), PANGO_ELLIPSIZE_END);
  gtk_label_set_lines (GTK_LABEL (self->range_note), 2);
  gtk_widget_add_css_class (self->range_note, "dim-label");
  gtk_widget_add_css_class (self->range_note, "caption");
  gtk_grid_attach (layout, self->range_note, 0, 3, 2, 1);
  gtk_widget_set_visible (self->range_note, FALSE);

  add_row_name (self, FLAGS_ROW, _("Flags"), NULL, FALSE);
  {
    static const char *const against[N_AGAINST_ROWS] = {
      N_("Operated leg against the other"),
      N_("Global offset against the other side"),
    };
    for (guint k = 0; k < N_AGAINST_ROWS; k++)
      add_row_name (self, AGAINST_LEG_ROW + (int) k, _(against[k]), NULL, FALSE);
  }
  for (guint r = 0; r < N_ROWS; r++)
    add_row_name (self, value_row_y (r), _(rows[r]->name),
                  rows[r]->unit[0] != '\0' ? _(rows[r]->unit) : "", FALSE);
  for (guint k = 0; k < N_RANGE_ROWS; k++)
    {
      GtkWidget *label = add_row_name (self, range_row_y (k), _(range_rows[k].label),
                                       _(range_rows[k].unit), TRUE);

      gtk_widget_set_visible (label, FALSE);
      self->range_label[k] = label;
    }
}

GtkAdjustment *
hl_results_get_adjustment (HlResults *self, GtkOrientation orientation)
{
  GtkScrolledWindow *body;

  g_return_val_if_fail (HL_IS_RESULTS (self), NULL);
  body = GTK_SCROLLED_WINDOW (self->body_scroll);
  return orientation == GTK_ORIENTATION_HORIZONTAL
         ? gtk_scrolled_window_get_hadjustment (body)
         : gtk_scrolled_window_get_vadjustment (body);
}

/* `widget`'s bounds in the coordinates of its window's surface (those
 * of `xdotool mousemove --window`). */
static gboolean
surface_bounds (GtkWidget *widget, graphene_rect_t *out)
{
  GtkNative *native = gtk_widget_get_native (widget);
  double tx, ty;

  if (native == NULL || !gtk_widget_get_mapped (widget)
      || !gtk_widget_compute_bounds (widget, GTK_WIDGET (native), out))
    return FALSE;
  gtk_native_get_surface_transform (native, &tx, &ty);
  out->origin.x += (float) tx;
  out->origin.y += (float) ty;
  return TRUE;
}

static void
print_rect (const char *what, const char *name, GtkWidget *widget)
{
  graphene_rect_t r;

  if (surface_bounds (widget, &r))
    printf ("%s %s %.0f %.0f %.0f %.0f\n", what, name, r.origin.x, r.origin.y,
            r.size.width, r.size.height);
}

void
hl_results_print_handles (HlResults *self)
{
  g_return_if_fail (HL_IS_RESULTS (self));
  if (!gtk_widget_get_mapped (GTK_WIDGET (self)))
    return;
  printf ("RESULTS scroll %.0f %.0f\n",
          gtk_adjustment_get_value (hl_results_get_adjustment (self, GTK_ORIENTATION_HORIZONTAL)),
          gtk_adjustment_get_value (hl_results_get_adjustment (self, GTK_ORIENTATION_VERTICAL)));
  print_rect ("RESULTS-AREA", "body", self->body_scroll);
  print_rect ("RESULTS-AREA", "header", self->header_scroll);
  print_rect ("RESULTS-AREA", "names", self->names_scroll);
  {
    graphene_rect_t r;

    if (surface_bounds (self->body_scroll, &r))
      printf ("WIDGET results-body %.0f %.0f\n", r.origin.x + r.size.width / 2,
              r.origin.y + r.size.height / 2);
  }
  /* Each column's option name and its first figure; each row's name and
   * its empty cell in the body. */
  for (guint c = 0; c < self->columns->len; c++)
    {
      HlResultsColumn *col = &g_array_index (self->columns, HlResultsColumn, c);
      g_autofree char *name = g_strdup_printf ("%u", c);

      print_rect ("RESULTS-HEADER", name, col->header);
      print_rect ("RESULTS-CELL", name, col->against[0]);
      if (gtk_widget_get_mapped (col->flags_more))
        {
          g_autofree char *why = g_strdup_printf ("results-why-%u", c);
          graphene_rect_t r;

          if (surface_bounds (col->flags_more, &r))
            printf ("WIDGET %s %.0f %.0f\n", why, r.origin.x + r.size.width / 2,
                    r.origin.y + r.size.height / 2);
          /* The full sentences, when shown: "RESULTS-WHY C LINES". */
          if (gtk_widget_get_mapped (col->flags_full))
            {
              const char *text = gtk_label_get_text (GTK_LABEL (col->flags_full));
              int lines = 1;

              for (const char *p = text; *p != '\0'; p++)
                lines += *p == '\n';
              printf ("RESULTS-WHY %u %d\n", c, lines);
            }
        }
    }
  for (int y = 0; y < N_BODY_ROWS; y++)
    {
      g_autofree char *name = g_strdup_printf ("%d", y);

      if (self->row_name[y] == NULL || !gtk_widget_get_visible (self->row_name[y]))
        continue;
      print_rect ("RESULTS-NAME", name, self->row_name[y]);
      if (self->columns->len > 0)
        print_rect ("RESULTS-ROW", name,
                    g_array_index (self->columns, HlResultsColumn, 0).slot[y]);
    }
}

GtkWidget *
hl_results_new (void)
{
  return g_object_new (HL_TYPE_RESULTS, NULL);
}

/* hl-report.c: the A4 PDF report, figures and sweep tables (cairo and pango).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The content comes from the core (core/hl-report-data.c): every line and
 * every table cell is text already.  Here it is set: pango wraps and
 * measures every paragraph and cell, the content becomes a flow of items
 * (a paragraph, a table row, a chart row, the figure), and the flow is cut
 * into as many A4 pages as it needs.  A heading, a caption and a table's
 * header stay with what follows them; a table that runs onto the next page
 * repeats its header there; a results table with many options is set in
 * groups of columns, each with the native hip for reference.  The items
 * are placed once, in hl_report_new; a page is drawn from those places.
 */
#include "config.h"

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include <glib.h>
#include <pango/pangocairo.h>

#include "hl-chart.h"
#include "hl-i18n.h"
#include "hl-palette.h"
#include "hl-plan-io.h"
#include "hl-render.h"
#include "hl-report.h"
#include "hl-underlay.h"
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
/* Baseline to baseline, times the font's own line height. */
#define LINE_SPACING 1.08
#define FONT_FAMILY "Sans"
/* Scales tried, largest first, for a report that keeps to two pages; a
 * report that needs more is set at the largest scale of the fewest pages. */
static const double layout_scales[] = { 1.0, 0.93, 0.86, 0.8, 0.74 };
#define PAGES_PREFERRED 2
/* Heights of the figure and of one chart panel at scale 1, pt. */
#define FIGURE_H 300.0
#define CHART_H 118.0
#define CHART_COLS 2
/* The results table: the quantity column, and at most this many case
 * columns (native and options) side by side; more options are set in
 * further groups of columns. */
#define RESULT_LABEL_W 150.0
#define RESULT_LABEL_W_MAX 210.0
#define RESULT_COL_MAX 96.0
#define RESULT_CASES_MAX 7
/* The landmarks table in three columns side by side. */
#define LANDMARK_COLS 3
#define LANDMARK_NUM_W 38.0
/* Width of the case name beside the inverse answers. */
#define ANSWER_NAME_W 96.0
#define CELL_PAD 2.6
#define CELL_PAD_Y 1.6
/* Figure drawing margin, px. */
#define FIGURE_MARGIN_PX 12.0
#define VIEW_COLS_MAX (1 + RESULT_CASES_MAX + 2)
#define ITEM_VIEWS_MAX LANDMARK_COLS

/* ---- Colours ------------------------------------------------------------ */

static const HlRgba ink = { 0.10, 0.11, 0.12, 1.0 };
static const HlRgba ink_soft = { 0.33, 0.35, 0.38, 1.0 };
static const HlRgba rule = { 0.72, 0.74, 0.77, 1.0 };
static const HlRgba shade = { 0.93, 0.94, 0.95, 1.0 };
static const HlRgba zebra = { 0.972, 0.976, 0.98, 1.0 };
static const HlRgba caution_ink = { 0.55, 0.2, 0.0, 1.0 };

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

/* ---- The flow ------------------------------------------------------------ */

/* Part of a table set as one block: some of its body rows and columns, at
 * x with these widths. */
typedef struct {
  const HlReportTable *t;
  int first;               /* first body row (a row index of t) */
  int n;                   /* body rows */
  int n_cols;
  int cols[VIEW_COLS_MAX];
  double widths[VIEW_COLS_MAX];
  double x;
  double size;
} HlTableView;

typedef enum {
  ITEM_TEXT,               /* a paragraph; with mark: a list item */
  ITEM_HEADING,            /* a section heading with its rule */
  ITEM_CAUTION,            /* the caution box */
  ITEM_COLUMNS,            /* two columns of lines */
  ITEM_ROW,                /* a row of one or more table views (row -1: the header) */
  ITEM_ANSWER,             /* a case name and one answer beside it */
  ITEM_FIGURE,
  ITEM_LEGEND,
  ITEM_CHART_ROW,
} HlItemKind;

typedef struct {
  HlItemKind kind;
  const char *text;
  const char *label;       /* ITEM_ANSWER: the case; ITEM_CAUTION: the title */
  char mark[24];           /* a list item's bullet or number */
  double x, w, size;
  bool bold;
  HlRgba colour;
  int views[ITEM_VIEWS_MAX];
  int n_views;
  int row;                 /* ITEM_ROW: body row k of the views, -1 the header */
  int header;              /* ITEM_ROW: the item of its header, -1 none */
  bool show_label;         /* ITEM_ANSWER: first of its case */
  double label_h;          /* ITEM_ANSWER: the height of its case's name */
  bool group_end;          /* ITEM_ANSWER: the last answer of its case */
  int chart;               /* ITEM_CHART_ROW: the chart */
  const HlReportLines *left, *right;   /* ITEM_COLUMNS */

  double h;
  double gap_after;
  bool keep_with_next;
  bool new_page;           /* leaves the first page (the schematic after page 1) */

  int page;                /* placed */
  double y;
  bool repeat_header;      /* at the top of a page: its header above it */
} HlItem;

struct HlReport {
  HlReportData *d;
  /* For the figure and the notes: the data's own. */
  const HlPlan *plan;
  int figure_option;
  HlReportSettings settings;
  HlUnderlay *underlay;    /* the radiograph under the schematic, or NULL */
  bool underlay_borrowed;  /* the caller's (hl_report_new_with_underlay) */
  bool underlay_left_out;  /* asked for but not drawn: underlay_note says why */
  HlError underlay_note;

  PangoContext *pango;
  double scale;
  int n_pages;

  HlItem *items;
  size_t n_items, cap_items;
  HlTableView *views;
  size_t n_views, cap_views;
  double head_h;           /* the running head of a continuation page */
  GArray *boxes;           /* non-NULL: every text box drawn (hl_report_page_text_boxes) */
};

/* ---- Text ------------------------------------------------------------------ */

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

/* A pango layout of `text` in `width` pt at `size` pt: words wrap, a word
 * longer than the width breaks between characters (no hyphen added). */
static PangoLayout *
text_layout (const HlReport *r, const char *text, double width, double size, bool bold,
             bool right)
{
  PangoLayout *layout = pango_layout_new (r->pango);
  PangoFontDescription *fd = pango_font_description_new ();
  pango_font_description_set_family (fd, FONT_FAMILY);
  pango_font_description_set_weight (fd, bold ? PANGO_WEIGHT_BOLD : PANGO_WEIGHT_NORMAL);
  pango_font_description_set_absolute_size (fd, size * PANGO_SCALE);
  pango_layout_set_font_description (layout, fd);
  pango_font_description_free (fd);
  PangoAttrList *attrs = pango_attr_list_new ();
  pango_attr_list_insert (attrs, pango_attr_insert_hyphens_new (FALSE));
  pango_layout_set_attributes (layout, attrs);
  pango_attr_list_unref (attrs);
  pango_layout_set_width (layout, (int) floor (fmax (width, 1.0) * PANGO_SCALE));
  pango_layout_set_wrap (layout, PANGO_WRAP_WORD_CHAR);
  pango_layout_set_line_spacing (layout, LINE_SPACING);
  pango_layout_set_alignment (layout, right ? PANGO_ALIGN_RIGHT : PANGO_ALIGN_LEFT);
  pango_layout_set_text (layout, text != NULL ? text : "", -1);
  return layout;
}

/* Measures, and with cr non-NULL draws, wrapped text from (x, y) in
 * `width`; returns its height.  Empty text has no height. */
static double
text_block (const HlReport *r, cairo_t *cr, const char *text, double x, double y,
            double width, double size, bool bold, HlRgba colour, bool right)
{
  if (text == NULL || text[0] == '\0')
    return 0.0;
  PangoLayout *layout = text_layout (r, text, width, size, bold, right);
  int w, h;
  pango_layout_get_size (layout, &w, &h);
  if (cr != NULL)
    {
      cairo_save (cr);
      set_rgba (cr, colour);
      cairo_move_to (cr, x, y);
      pango_cairo_show_layout (cr, layout);
      cairo_restore (cr);
      if (r->boxes != NULL)
        {
          PangoRectangle ink_r, logical;
          pango_layout_get_extents (layout, &ink_r, &logical);
          HlReportTextBox box = {
            .x = x + (double) logical.x / PANGO_SCALE,
            .y = y + (double) logical.y / PANGO_SCALE,
            .w = (double) logical.width / PANGO_SCALE,
            .h = (double) logical.height / PANGO_SCALE,
          };
          g_strlcpy (box.text, text, sizeof box.text);
          g_array_append_val (r->boxes, box);
        }
    }
  g_object_unref (layout);
  return (double) h / PANGO_SCALE;
}

/* ---- Building the flow --------------------------------------------------------- */

static HlItem *
item_add (HlReport *r, HlItemKind kind)
{
  if (r->n_items == r->cap_items)
    {
      r->cap_items = r->cap_items ? 2 * r->cap_items : 128;
      r->items = g_renew (HlItem, r->items, r->cap_items);
    }
  HlItem *it = &r->items[r->n_items++];
  memset (it, 0, sizeof *it);
  it->kind = kind;
  it->header = -1;
  it->colour = ink;
  it->x = content_left ();
  it->w = content_width ();
  return it;
}

/* The gap after the last item: a block ends there. */
static void
end_block (HlReport *r)
{
  if (r->n_items > 0)
    r->items[r->n_items - 1].gap_after = BLOCK_GAP * r->scale;
}

static HlItem *
add_text (HlReport *r, const char *text, double size, bool bold, HlRgba colour)
{
  HlItem *it = item_add (r, ITEM_TEXT);
  it->text = text;
  it->size = size;
  it->bold = bold;
  it->colour = colour;
  it->h = text_block (r, NULL, text, it->x, 0, it->w, size, bold, colour, false);
  return it;
}

static void
add_heading (HlReport *r, const char *text, bool new_page)
{
  HlItem *it = item_add (r, ITEM_HEADING);
  it->text = text;
  it->size = TYPE_HEADING * r->scale;
  it->h = text_block (r, NULL, text, it->x, 0, it->w, it->size, true, ink, false) + 3.0;
  it->keep_with_next = true;
  it->new_page = new_page;
}

static void
add_list (HlReport *r, const HlReportLines *lines, bool numbered)
{
  double indent = numbered ? 12.0 : 8.0;
  for (size_t i = 0; i < lines->n; i++)
    {
      HlItem *it = item_add (r, ITEM_TEXT);
      it->text = lines->items[i];
      it->size = TYPE_SMALL * r->scale;
      if (numbered)
        snprintf (it->mark, sizeof it->mark, "%zu.", i + 1);
      else
        snprintf (it->mark, sizeof it->mark, "\xe2\x80\xa2");
      it->x = content_left () + indent;
      it->w = content_width () - indent;
      it->h = text_block (r, NULL, it->text, 0, 0, it->w, it->size, false, ink, false);
    }
}

static int
view_add (HlReport *r, const HlReportTable *t, int first, int n, const int *cols,
          const double *widths, int n_cols, double x, double size)
{
  if (r->n_views == r->cap_views)
    {
      r->cap_views = r->cap_views ? 2 * r->cap_views : 16;
      r->views = g_renew (HlTableView, r->views, r->cap_views);
    }
  HlTableView *v = &r->views[r->n_views];
  memset (v, 0, sizeof *v);
  v->t = t;
  v->first = first;
  v->n = n;
  v->n_cols = n_cols;
  for (int c = 0; c < n_cols; c++)
    {
      v->cols[c] = cols[c];
      v->widths[c] = widths[c];
    }
  v->x = x;
  v->size = size;
  return (int) r->n_views++;
}

static bool
cell_bold (const HlReportTable *t, int trow)
{
  return trow < t->header_rows || (t->emphasis != NULL && t->emphasis[trow]);
}

static bool
cell_right (const HlReportTable *t, int trow, int col)
{
  return t->numeric[col] && !(trow < t->header_rows && col == 0);
}

/* One table row of a view: trow a row index of the table. */
static double
view_row (const HlReport *r, cairo_t *cr, const HlTableView *v, int trow, double y,
          bool stripe)
{
  double h = 0.0;
  for (int c = 0; c < v->n_cols; c++)
    h = fmax (h, text_block (r, NULL, hl_report_table_cell (v->t, trow, v->cols[c]), 0, 0,
                             v->widths[c] - 2 * CELL_PAD, v->size, cell_bold (v->t, trow),
                             ink, false));
  h += 2.0 * CELL_PAD_Y;
  if (cr == NULL)
    return h;

  double total_w = 0.0;
  for (int c = 0; c < v->n_cols; c++)
    total_w += v->widths[c];
  bool header = trow < v->t->header_rows;
  if (header || stripe)
    {
      set_rgba (cr, header ? shade : zebra);
      cairo_rectangle (cr, v->x, y, total_w, h);
      cairo_fill (cr);
    }
  double cx = v->x;
  for (int c = 0; c < v->n_cols; c++)
    {
      text_block (r, cr, hl_report_table_cell (v->t, trow, v->cols[c]), cx + CELL_PAD,
                  y + CELL_PAD_Y, v->widths[c] - 2 * CELL_PAD, v->size,
                  cell_bold (v->t, trow), ink, cell_right (v->t, trow, v->cols[c]));
      cx += v->widths[c];
    }
  if (header && trow == v->t->header_rows - 1)
    {
      set_rgba (cr, ink_soft);
      cairo_set_line_width (cr, 0.7);
      cairo_move_to (cr, v->x, y + h);
      cairo_line_to (cr, v->x + total_w, y + h);
      cairo_stroke (cr);
    }
  return h;
}

/* The header rows (row < 0) or body row k of every view of an item;
 * returns the height. */
static double
row_item (const HlReport *r, cairo_t *cr, const HlItem *it, double y)
{
  double h = 0.0;
  for (int i = 0; i < it->n_views; i++)
    {
      const HlTableView *v = &r->views[it->views[i]];
      double vh = 0.0;
      if (it->row < 0)
        for (int hr = 0; hr < v->t->header_rows; hr++)
          vh += view_row (r, NULL, v, hr, 0, false);
      else if (it->row < v->n)
        vh = view_row (r, NULL, v, v->first + it->row, 0, false);
      h = fmax (h, vh);
    }
  if (cr == NULL)
    return h;
  for (int i = 0; i < it->n_views; i++)
    {
      const HlTableView *v = &r->views[it->views[i]];
      double total_w = 0.0;
      for (int c = 0; c < v->n_cols; c++)
        total_w += v->widths[c];
      if (it->row < 0)
        {
          double yy = y;
          for (int hr = 0; hr < v->t->header_rows; hr++)
            yy += view_row (r, cr, v, hr, yy, false);
          continue;
        }
      if (it->row >= v->n)
        continue;
      view_row (r, cr, v, v->first + it->row, y, it->row % 2 == 1);
      if (it->row == v->n - 1)
        {
          double vh = view_row (r, NULL, v, v->first + it->row, 0, false);
          set_rgba (cr, rule);
          cairo_set_line_width (cr, 0.6);
          cairo_move_to (cr, v->x, y + vh);
          cairo_line_to (cr, v->x + total_w, y + vh);
          cairo_stroke (cr);
        }
    }
  return h;
}

/* A table set as n_sets views side by side (views[i]), every row one item;
 * the header stays with the first row and comes again on a new page. */
static void
add_table_rows (HlReport *r, const int *views, int n_views)
{
  HlItem *head = item_add (r, ITEM_ROW);
  size_t head_index = r->n_items - 1;
  int n_rows = 0;
  for (int i = 0; i < n_views; i++)
    {
      head->views[i] = views[i];
      n_rows = MAX (n_rows, r->views[views[i]].n);
    }
  head->n_views = n_views;
  head->row = -1;
  head->keep_with_next = n_rows > 0;
  head->h = row_item (r, NULL, head, 0);
  for (int k = 0; k < n_rows; k++)
    {
      HlItem *it = item_add (r, ITEM_ROW);
      for (int i = 0; i < n_views; i++)
        it->views[i] = views[i];
      it->n_views = n_views;
      it->row = k;
      it->header = (int) head_index;
      it->h = row_item (r, NULL, it, 0);
    }
}

/* A whole table in the content width: column 0 `first_w` wide, the rest
 * sharing what is left in the proportions of `weights` (NULL: equal). */
static void
add_table (HlReport *r, const HlReportTable *t, double first_w, const double *weights,
           double size)
{
  int cols[VIEW_COLS_MAX];
  double widths[VIEW_COLS_MAX];
  double sum = 0.0;
  int n_cols = MIN (t->n_cols, VIEW_COLS_MAX);
  for (int c = 1; c < n_cols; c++)
    sum += weights != NULL ? weights[c] : 1.0;
  for (int c = 0; c < n_cols; c++)
    {
      cols[c] = c;
      widths[c] = c == 0 ? first_w
                         : (content_width () - first_w) * (weights != NULL ? weights[c] : 1.0)
                           / sum;
    }
  int v = view_add (r, t, t->header_rows, t->n_rows - t->header_rows, cols, widths, n_cols,
                    content_left (), size);
  add_table_rows (r, &v, 1);
}

static void
add_title (HlReport *r)
{
  const HlReportData *d = r->d;
  const double s = r->scale;
  add_text (r, d->title, TYPE_TITLE * s, true, ink)->gap_after = 2.0;
  add_text (r, d->case_line, TYPE_CASE * s, true, ink)->gap_after = 1.0;
  add_text (r, d->meta_line, TYPE_BODY * s, false, ink_soft);
  end_block (r);

  HlItem *it = item_add (r, ITEM_CAUTION);
  it->label = d->caution_title;
  it->text = d->caution_text;
  double tw = content_width () - 2 * 6.0 * s - 4.0;
  it->h = text_block (r, NULL, it->label, 0, 0, tw, TYPE_CASE * s, true, ink, false)
          + text_block (r, NULL, it->text, 0, 0, tw, TYPE_BODY * s, false, ink, false)
          + 2 * 6.0 * s + 2.0;
  end_block (r);
}

static void
add_inputs (HlReport *r)
{
  const HlReportData *d = r->d;
  add_heading (r, d->inputs_heading, false);
  HlItem *it = item_add (r, ITEM_COLUMNS);
  it->left = &d->inputs_left;
  it->right = &d->inputs_right;
  it->size = TYPE_BODY * r->scale * 0.95;
  double colw = 0.5 * content_width () - 6.0, hl = 0.0, hr = 0.0;
  for (size_t i = 0; i < it->left->n; i++)
    hl += text_block (r, NULL, it->left->items[i], 0, 0, colw, it->size, false, ink, false);
  for (size_t i = 0; i < it->right->n; i++)
    hr += text_block (r, NULL, it->right->items[i], 0, 0, colw, it->size, false, ink, false);
  it->h = fmax (hl, hr);
  end_block (r);
}

static void
add_landmarks (HlReport *r)
{
  const HlReportData *d = r->d;
  const HlReportTable *t = &d->landmarks;
  add_text (r, d->landmarks_caption, TYPE_BODY * r->scale, true, ink)->keep_with_next = true;
  r->items[r->n_items - 1].gap_after = 2.0;
  int body = t->n_rows - t->header_rows;
  int per_col = (body + LANDMARK_COLS - 1) / LANDMARK_COLS;
  double colw = content_width () / LANDMARK_COLS - 8.0;
  const int cols[3] = { 0, 1, 2 };
  const double widths[3] = { colw - 2 * LANDMARK_NUM_W, LANDMARK_NUM_W, LANDMARK_NUM_W };
  int views[LANDMARK_COLS];
  for (int k = 0; k < LANDMARK_COLS; k++)
    {
      int first = k * per_col;
      int n = MIN (per_col, body - first);
      views[k] = view_add (r, t, t->header_rows + first, MAX (n, 0), cols, widths, 3,
                           content_left () + k * (colw + 12.0), TYPE_SMALL * r->scale);
    }
  add_table_rows (r, views, LANDMARK_COLS);
  r->items[r->n_items - 1].gap_after = 1.0;
  add_text (r, d->landmarks_note, TYPE_SMALL * r->scale, false, ink_soft);
  end_block (r);
}

static void
add_options (HlReport *r)
{
  const HlReportData *d = r->d;
  const double s = r->scale;
  add_text (r, d->options_caption, TYPE_BODY * s, true, ink)->keep_with_next = true;
  r->items[r->n_items - 1].gap_after = 2.0;
  if (d->options_none != NULL)
    add_text (r, d->options_none, TYPE_BODY * s, false, ink);
  else
    add_table (r, &d->options, content_width () - 6 * 62.0, NULL, TYPE_TABLE * s);
  if (d->implants_caption != NULL)
    {
      r->items[r->n_items - 1].gap_after = 4.0;
      add_text (r, d->implants_caption, TYPE_BODY * s, true, ink)->keep_with_next = true;
      r->items[r->n_items - 1].gap_after = 2.0;
      const double weights[6] = { 0, 1, 1, 1, 0.6, 1.4 };
      add_table (r, &d->implants, 110.0, weights, TYPE_TABLE * s);
    }
  end_block (r);
}

static void
add_against (HlReport *r)
{
  const HlReportData *d = r->d;
  add_heading (r, d->against_heading, false);
  for (size_t i = 0; i < d->against.n; i++)
    add_text (r, d->against.items[i], TYPE_BODY * r->scale, false, ink);
  end_block (r);
}

/* The results in groups of at most RESULT_CASES_MAX case columns, as even
 * as they come; native leads every group. */
static void
add_results (HlReport *r)
{
  const HlReportData *d = r->d;
  const HlReportTable *t = &d->results_table;
  size_t n_opts = d->n_cases - 1;
  size_t per_group = RESULT_CASES_MAX - 1;
  size_t n_groups = n_opts == 0 ? 1 : (n_opts + per_group - 1) / per_group;
  size_t in_group = n_groups == 0 ? 0 : (n_opts + n_groups - 1) / n_groups;

  add_heading (r, d->results_heading, false);
  for (size_t g = 0; g < n_groups; g++)
    {
      size_t first = g * in_group, last = MIN (n_opts, first + in_group);
      int cols[VIEW_COLS_MAX];
      double widths[VIEW_COLS_MAX];
      int n_cols = 0;
      cols[n_cols++] = 0;
      cols[n_cols++] = 1;
      for (size_t o = first; o < last; o++)
        cols[n_cols++] = 2 + (int) o;
      /* Few columns stay near their labels instead of spreading. */
      double colw = fmin (RESULT_COL_MAX, (content_width () - RESULT_LABEL_W) / (n_cols - 1));
      /* Room left over goes to the quantities' names first. */
      widths[0] = fmax (RESULT_LABEL_W, fmin (RESULT_LABEL_W_MAX,
                                              content_width () - (n_cols - 1) * colw));
      for (int c = 1; c < n_cols; c++)
        widths[c] = colw;
      int v = view_add (r, t, t->header_rows, t->n_rows - t->header_rows, cols, widths,
                        n_cols, content_left (), TYPE_TABLE * r->scale);
      add_table_rows (r, &v, 1);
      if (g + 1 < n_groups)
        r->items[r->n_items - 1].gap_after = 5.0;
    }
  if (d->mc_note != NULL)
    {
      r->items[r->n_items - 1].gap_after = BLOCK_GAP * r->scale;
      add_text (r, d->mc_note, TYPE_SMALL * r->scale, false, ink_soft);
    }
  end_block (r);
}

static void
add_lines (HlReport *r, const char *heading, const HlReportLines *lines)
{
  add_heading (r, heading, false);
  for (size_t i = 0; i < lines->n; i++)
    add_text (r, lines->items[i], TYPE_BODY * r->scale, false, ink);
  end_block (r);
}

static void
add_capacity (HlReport *r)
{
  const HlReportData *d = r->d;
  add_heading (r, d->capacity_heading, false);
  add_text (r, d->capacity_text, TYPE_BODY * r->scale, false, ink)->gap_after = 1.0;
  add_text (r, d->capacity_note, TYPE_SMALL * r->scale, false, ink_soft);
  end_block (r);
}

static void
add_inverse (HlReport *r)
{
  const HlReportData *d = r->d;
  const double size = TYPE_BODY * r->scale;
  add_heading (r, d->inverse_heading, false);
  add_text (r, d->inverse_caveat, size, false, ink)->gap_after = 3.0;
  double group_h = 0.0, label_h = 0.0;
  for (size_t i = 0; i < d->n_answers; i++)
    {
      const HlReportAnswer *a = &d->answers[i];
      HlItem *it = item_add (r, ITEM_ANSWER);
      it->label = d->case_names[a->row];
      it->text = a->text;
      it->size = size;
      it->show_label = i == 0 || d->answers[i - 1].row != a->row;
      it->h = text_block (r, NULL, it->text, 0, 0, content_width () - ANSWER_NAME_W, size,
                          false, ink, false);
      if (it->show_label)
        {
          group_h = 0.0;
          label_h = text_block (r, NULL, it->label, 0, 0, ANSWER_NAME_W - 4, size, true, ink,
                                false);
        }
      group_h += it->h;
      it->label_h = label_h;
      /* A case's answers stay together on a page when they fit one (and
       * the name, repeated at the top of a page when they do not, is
       * never drawn over the next case's: paginate). */
      it->group_end = i + 1 == d->n_answers || d->answers[i + 1].row != a->row;
      it->keep_with_next = !it->group_end;
      /* The case's name may take more lines than its answers. */
      if (it->group_end)
        it->gap_after = 2.0 + fmax (0.0, label_h - group_h);
    }
  end_block (r);
}

static void
add_figure (HlReport *r)
{
  add_heading (r, r->d->figure_heading, true);
  HlItem *it = item_add (r, ITEM_FIGURE);
  it->h = FIGURE_H * r->scale;
  end_block (r);
}

static void
chart_style (const HlReport *r, HlChartStyle *style)
{
  hl_chart_style_init (style, false);
  style->font_px = 7.0 * r->scale;
  style->line_px = 1.2;
  style->show_legend = false;
  style->show_bands = r->d->have_mc;
}

static void
add_charts (HlReport *r, cairo_t *measure)
{
  const HlReportData *d = r->d;
  HlChartStyle style;
  chart_style (r, &style);
  add_heading (r, d->charts_heading, false);
  HlItem *it = item_add (r, ITEM_LEGEND);
  it->h = hl_chart_draw_legend (measure, d->charts[0], &style, content_left (), 0,
                                content_width (), d->have_mc, false) + 2.0;
  it->keep_with_next = true;
  for (int k = 0; k < HL_CHART_N; k++)
    {
      it = item_add (r, ITEM_CHART_ROW);
      it->chart = k;
      it->h = CHART_H * r->scale;
    }
  end_block (r);
}

static void
build_flow (HlReport *r, cairo_t *measure)
{
  const HlReportData *d = r->d;
  r->n_items = 0;
  r->n_views = 0;
  add_title (r);
  add_inputs (r);
  add_landmarks (r);
  add_options (r);
  add_against (r);
  add_results (r);
  add_lines (r, d->flags_heading, &d->flags);
  add_capacity (r);
  add_inverse (r);
  add_figure (r);
  add_charts (r, measure);
  add_heading (r, d->assumptions_heading, false);
  add_list (r, &d->assumptions, false);
  end_block (r);
  add_heading (r, d->sources_heading, false);
  add_list (r, &d->sources, true);
  end_block (r);
}

/* ---- Pages ------------------------------------------------------------------- */

/* Height of the items from i on that must stay together: i and every item
 * that follows an item kept with the next. */
static double
kept_height (const HlReport *r, size_t i)
{
  double h = r->items[i].h;
  while (r->items[i].keep_with_next && i + 1 < r->n_items)
    {
      h += r->items[i].gap_after;
      i++;
      h += r->items[i].h;
    }
  return h;
}

/* Places every item on a page; returns the number of pages. */
static int
paginate (HlReport *r)
{
  int page = 0;
  double top = MARGIN_TOP;
  double y = top;
  double room = page_bottom () - (MARGIN_TOP + r->head_h);
  double label_bottom = 0.0;   /* ITEM_ANSWER: the bottom of its case's name */

  for (size_t i = 0; i < r->n_items; i++)
    {
      HlItem *it = &r->items[i];
      bool at_top = y <= top + 1e-6;
      double need = fmin (kept_height (r, i), room);
      bool is_row = it->kind == ITEM_ROW && it->header >= 0;
      double header_h = is_row ? r->items[it->header].h : 0.0;
      if (!at_top && ((it->new_page && page == 0) || y + need > page_bottom ()))
        {
          page++;
          top = MARGIN_TOP + r->head_h;
          y = top;
          at_top = true;
        }
      it->repeat_header = false;
      if (at_top && is_row && r->items[it->header].page != page)
        {
          it->repeat_header = true;
          y += header_h;
        }
      if (it->kind == ITEM_ANSWER && at_top && i > 0)
        it->show_label = true;
      it->page = page;
      it->y = y;
      if (it->kind == ITEM_ANSWER)
        {
          /* The case's name, where it is drawn last, must end before
           * whatever follows its answers. */
          if (it->show_label)
            label_bottom = y + it->label_h;
          if (it->group_end)
            it->gap_after = 2.0 + fmax (0.0, label_bottom - (y + it->h));
        }
      y += it->h + it->gap_after;
    }
  return page + 1;
}

static void
layout (HlReport *r, double scale)
{
  cairo_surface_t *s = cairo_recording_surface_create (CAIRO_CONTENT_COLOR_ALPHA, NULL);
  cairo_t *cr = cairo_create (s);
  r->scale = scale;
  r->head_h = text_block (r, NULL, r->d->continued, 0, 0, content_width (),
                          TYPE_BODY * scale, true, ink_soft, false) + 4.0;
  build_flow (r, cr);
  r->n_pages = paginate (r);
  cairo_destroy (cr);
  cairo_surface_destroy (s);
}

/* ---- Drawing an item ------------------------------------------------------------ */

/* The schematic of page 2 in a width x height box at the report's own
 * text size; markers, lines and bars follow it. */
/* The schematic of page 2 in a width x height box at the report's own
 * text size; markers, lines and bars follow it. */
#define REPORT_FIGURE_FONT_PT 8.0
/* Device px per point the radiograph's copy is chosen for: a page printed
 * at 300 dpi (common practice for print), 300 / 72. */
#define REPORT_UNDERLAY_DETAIL (300.0 / 72.0)

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
  if (r->underlay != NULL)
    {
      cairo_set_source_rgb (cr, style.bg.r, style.bg.g, style.bg.b);
      cairo_paint (cr);
      if (hl_underlay_draw_plan (r->underlay, cr, r->plan, &view, REPORT_UNDERLAY_DETAIL))
        {
          style.paint_background = false;
          style.over_image = true;
          style.hide_schematic = !r->plan->radiograph.schematic_visible;
        }
    }
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


static void
draw_heading (const HlReport *r, cairo_t *cr, const HlItem *it)
{
  double h = text_block (r, cr, it->text, it->x, it->y, it->w, it->size, true,
                         heading_colour (), false);
  set_rgba (cr, rule);
  cairo_set_line_width (cr, 0.6);
  cairo_move_to (cr, it->x, it->y + h + 0.8);
  cairo_line_to (cr, it->x + it->w, it->y + h + 0.8);
  cairo_stroke (cr);
}

static void
draw_caution (const HlReport *r, cairo_t *cr, const HlItem *it)
{
  const double s = r->scale;
  const double pad = 6.0 * s;
  const double bar = 4.0;
  double x = it->x, y = it->y, w = it->w, h = it->h;
  double tw = w - 2 * pad - bar;
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR_FILL, false));
  cairo_rectangle (cr, x, y, w, h);
  cairo_fill (cr);
  set_rgba (cr, hl_palette_color (HL_ROLE_ERROR, false));
  cairo_rectangle (cr, x, y, bar, h);
  cairo_fill (cr);
  cairo_set_line_width (cr, 1.4);
  cairo_rectangle (cr, x + 0.7, y + 0.7, w - 1.4, h - 1.4);
  cairo_stroke (cr);
  double h1 = text_block (r, cr, it->label, x + bar + pad, y + pad, tw, TYPE_CASE * s, true,
                          caution_ink, false);
  text_block (r, cr, it->text, x + bar + pad, y + pad + h1 + 2, tw, TYPE_BODY * s, false,
              ink, false);
}

static void
draw_columns (const HlReport *r, cairo_t *cr, const HlItem *it)
{
  double colw = 0.5 * content_width () - 6.0;
  double y = it->y;
  for (size_t i = 0; i < it->left->n; i++)
    y += text_block (r, cr, it->left->items[i], content_left (), y, colw, it->size, false,
                     ink, false);
  y = it->y;
  for (size_t i = 0; i < it->right->n; i++)
    y += text_block (r, cr, it->right->items[i], content_left () + colw + 12.0, y, colw,
                     it->size, false, ink, false);
}

static void
draw_item (const HlReport *r, cairo_t *cr, const HlItem *it)
{
  const HlReportData *d = r->d;
  switch (it->kind)
    {
    case ITEM_TEXT:
      if (it->mark[0] != '\0')
        text_block (r, cr, it->mark, content_left (), it->y, it->x - content_left (),
                    it->size, false, ink, false);
      text_block (r, cr, it->text, it->x, it->y, it->w, it->size, it->bold, it->colour, false);
      break;
    case ITEM_HEADING:
      draw_heading (r, cr, it);
      break;
    case ITEM_CAUTION:
      draw_caution (r, cr, it);
      break;
    case ITEM_COLUMNS:
      draw_columns (r, cr, it);
      break;
    case ITEM_ROW:
      if (it->repeat_header)
        row_item (r, cr, &r->items[it->header], it->y - r->items[it->header].h);
      row_item (r, cr, it, it->y);
      break;
    case ITEM_ANSWER:
      if (it->show_label)
        text_block (r, cr, it->label, content_left (), it->y, ANSWER_NAME_W - 4, it->size,
                    true, ink, false);
      text_block (r, cr, it->text, content_left () + ANSWER_NAME_W, it->y,
                  content_width () - ANSWER_NAME_W, it->size, false, ink, false);
      break;
    case ITEM_FIGURE:
      cairo_save (cr);
      cairo_translate (cr, content_left (), it->y);
      cairo_rectangle (cr, 0, 0, content_width (), it->h);
      cairo_clip (cr);
      report_figure (r, cr, content_width (), it->h, NULL);
      cairo_restore (cr);
      set_rgba (cr, rule);
      cairo_set_line_width (cr, 0.6);
      cairo_rectangle (cr, content_left (), it->y, content_width (), it->h);
      cairo_stroke (cr);
      break;
    case ITEM_LEGEND:
    case ITEM_CHART_ROW:
      {
        HlChartStyle style;
        chart_style (r, &style);
        if (it->kind == ITEM_LEGEND)
          {
            hl_chart_draw_legend (cr, d->charts[0], &style, content_left (), it->y,
                                  content_width (), d->have_mc, true);
            break;
          }
        double cw = content_width () / CHART_COLS;
        for (int q = 0; q < HL_CHART_QUANTITY_N; q++)
          hl_chart_draw (cr, d->charts[it->chart], (HlChartQuantity) q, &style,
                         content_left () + q * cw, it->y, cw - 4.0, it->h);
      }
      break;
    }
}

static void
draw_footer (const HlReport *r, cairo_t *cr, int page)
{
  double y = HL_REPORT_PAGE_HEIGHT_PT - FOOTER_H;
  set_rgba (cr, rule);
  cairo_set_line_width (cr, 0.6);
  cairo_move_to (cr, content_left (), y);
  cairo_line_to (cr, content_left () + content_width (), y);
  cairo_stroke (cr);
  char right[128];
  snprintf (right, sizeof right, _("Page %d of %d"), page + 1, r->n_pages);
  double rw = 70.0;
  /* clear of the page number and of the version line under it */
  text_block (r, cr, r->d->footer_caution, content_left (), y + 3,
              content_width () - 2 * rw - 6.0, TYPE_SMALL, true, caution_ink, false);
  text_block (r, cr, right, content_left () + content_width () - rw, y + 3, rw, TYPE_SMALL,
              false, ink_soft, true);
  text_block (r, cr, r->d->footer_version, content_left () + content_width () - 2 * rw,
              y + 3 + TYPE_SMALL * 1.4, 2 * rw, TYPE_SMALL, false, ink_soft, true);
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
  if (page > 0)
    text_block (r, cr, r->d->continued, content_left (), MARGIN_TOP, content_width (),
                TYPE_BODY * r->scale, true, ink_soft, false);
  for (size_t i = 0; i < r->n_items; i++)
    if (r->items[i].page == page)
      draw_item (r, cr, &r->items[i]);
  draw_footer (r, cr, page);
  cairo_restore (cr);
}

/* ---- The report --------------------------------------------------------------- */

HlReport *
hl_report_new (const HlPlan *plan, const HlReportSettings *settings, HlError *err)
{
  return hl_report_new_with_underlay (plan, settings, NULL, err);
}

HlReport *
hl_report_new_with_underlay (const HlPlan *plan, const HlReportSettings *settings,
                             HlUnderlay *underlay, HlError *err)
{
  HlReportData *d = hl_report_data_new (plan, settings, err);
  if (d == NULL)
    return NULL;
  HlReport *r = g_new0 (HlReport, 1);
  r->d = d;
  r->plan = d->plan;
  r->figure_option = d->figure_option;
  r->settings = d->settings;
  /* The radiograph under the schematic: a missing or changed image leaves
   * the report complete without it, and the note says why. */
  hl_error_clear (&r->underlay_note);
  if (r->settings.underlay && r->plan->radiograph.present && underlay != NULL)
    {
      r->underlay = underlay;
      r->underlay_borrowed = true;
    }
  else if (r->settings.underlay && r->plan->radiograph.present)
    {
      r->underlay = hl_underlay_for_plan (r->plan, &r->underlay_note);
      r->underlay_left_out = r->underlay == NULL;
    }

  /* One context for measuring and drawing, independent of any device:
   * unhinted metrics, so a line breaks where it was measured on a PDF, a
   * print or a picture alike; sizes are absolute, in points. */
  r->pango = pango_font_map_create_context (pango_cairo_font_map_get_default ());
  cairo_font_options_t *fo = cairo_font_options_create ();
  cairo_font_options_set_hint_metrics (fo, CAIRO_HINT_METRICS_OFF);
  cairo_font_options_set_hint_style (fo, CAIRO_HINT_STYLE_NONE);
  pango_cairo_context_set_font_options (r->pango, fo);
  cairo_font_options_destroy (fo);
  pango_context_set_round_glyph_positions (r->pango, FALSE);

  /* The largest type that keeps to two pages; when none does, the
   * largest type of the fewest pages. */
  size_t best = 0;
  int best_pages = 0;
  for (size_t i = 0; i < G_N_ELEMENTS (layout_scales); i++)
    {
      layout (r, layout_scales[i]);
      if (r->n_pages <= PAGES_PREFERRED)
        return r;
      if (i == 0 || r->n_pages < best_pages)
        best = i, best_pages = r->n_pages;
    }
  layout (r, layout_scales[best]);
  return r;
}

void
hl_report_free (HlReport *r)
{
  if (r == NULL)
    return;
  if (r->pango != NULL)
    g_object_unref (r->pango);
  g_free (r->items);
  g_free (r->views);
  if (!r->underlay_borrowed)
    hl_underlay_free (r->underlay);
  hl_report_data_free (r->d);
  g_free (r);
}

const HlError *
hl_report_underlay_note (const HlReport *r)
{
  return r->underlay_left_out ? &r->underlay_note : NULL;
}

int
hl_report_n_pages (const HlReport *r)
{
  return r->n_pages;
}

double
hl_report_compute_seconds (const HlReport *r)
{
  return r->d->compute_s;
}

const HlReportData *
hl_report_data (const HlReport *r)
{
  return r->d;
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

HlReportTextBox *
hl_report_page_text_boxes (HlReport *r, int page, size_t *n)
{
  cairo_surface_t *s = cairo_recording_surface_create (CAIRO_CONTENT_COLOR_ALPHA, NULL);
  cairo_t *cr = cairo_create (s);
  r->boxes = g_array_new (FALSE, TRUE, sizeof (HlReportTextBox));
  hl_report_draw_page (r, cr, page);
  cairo_destroy (cr);
  cairo_surface_destroy (s);
  *n = r->boxes->len;
  HlReportTextBox *out = (HlReportTextBox *) (void *) g_array_free (r->boxes, FALSE);
  r->boxes = NULL;
  return out;
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
  for (int page = 0; page < r->n_pages; page++)
    {
      hl_report_draw_page (r, cr, page);
      cairo_show_page (cr);
    }
  cairo_destroy (cr);
  return finish_stream (surface, &m, _("report"), out, size, err);
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
             HlRenderPreset preset, HlUnderlay *underlay)
{
  hl_render_figure_draw (cr, plan, option_index, width, height, preset, underlay, NULL);
}

HlStatus
hl_figure_to_buffer (const HlPlan *plan, int option_index, int width, int height,
                     HlFigureFormat format, unsigned char **out, size_t *size, HlError *err)
{
  return hl_figure_to_buffer_preset (plan, option_index, width, height,
                                     HL_RENDER_PRESET_AUTO, NULL, format, out, size, err);
}

HlStatus
hl_figure_to_buffer_preset (const HlPlan *plan, int option_index, int width, int height,
                            HlRenderPreset preset, HlUnderlay *underlay, HlFigureFormat format,
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
      figure_draw (cr, plan, option_index, width, height, preset, underlay);
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
  figure_draw (cr, plan, option_index, width, height, preset, underlay);
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
                                HL_RENDER_PRESET_AUTO, NULL, path, err);
}

HlStatus
hl_figure_save_preset (const HlPlan *plan, int option_index, int width, int height,
                       HlRenderPreset preset, HlUnderlay *underlay, const char *path,
                       HlError *err)
{
  HlFigureFormat format;
  if (!hl_figure_format_from_path (path, &format))
    return hl_error_set (err, HL_ERR_INVALID, "figure path",
                         _("The file name \"%.200s\" ends neither in .svg nor in .png."),
                         path != NULL ? path : "");
  unsigned char *data = NULL;
  size_t size = 0;
  HlStatus st = hl_figure_to_buffer_preset (plan, option_index, width, height, preset,
                                            underlay, format, &data, &size, err);
  if (st == HL_OK)
    st = hl_write_file_atomic (path, data, size, err);
  free (data);
  return st;
}

/* ---- Sweep tables --------------------------------------------------------------- */

HlStatus
hl_report_sweeps_csv (const HlReport *r, char **out, size_t *size, HlError *err)
{
  return hl_report_data_sweeps_csv (r->d, out, size, err);
}

/* hl-charts-view.c: the charts in the window's lower area.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-charts-view"

#include <inttypes.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-charts-view.h"
#include "hl-uncertainty.h"
#include "hl-worker.h"

/* Below this width the two charts go one above the other. */
#define CHARTS_SIDE_BY_SIDE_MIN_PX 640
#define CHART_MIN_WIDTH_PX 280
#define CHART_MIN_HEIGHT_PX 180
#define CHART_NAT_WIDTH_PX 900
#define CHART_NAT_HEIGHT_PX 300
#define CHART_GAP_PX 8.0
#define CHART_FONT_PX 11.0
#define BAR_SPACING 6
/* During a drag the charts follow at most this often, ms: redrawing
 * both charts on every frame would cost the drag its frame rate. */
#define CHARTS_DRAG_INTERVAL_MS 100
/* Text lighter than this means a dark theme. */
#define DARK_LUMINANCE 0.5

static const char *const kind_labels[HL_CHART_N] = {
  N_("Femoral offset change"),
  N_("Cane force"),
  N_("Load in the opposite hand"),
  N_("Load in the same-side hand"),
};

struct _HlChartsView {
  GtkWidget parent_instance;

  /* built in code */
  GtkWidget *bar;               /* two rows, so that it fits a narrow window */
  GtkWidget *kind_drop;
  GtkWidget *bands_check;
  GtkWidget *info_label;

  /* borrowed */
  const HlPlan *plan;
  HlDocument *document;

  /* owned */
  HlChartData *data;
  char *error;
  GCancellable *cancel;         /* of the one computation running */

  /* state */
  HlChartKind kind;
  gboolean show_bands;
  gboolean stale;
  gboolean running;
  gint64 last_start_us;         /* of the last computation started */
  guint later;                  /* a computation waiting out the interval */
  gboolean wanted;              /* a newer state waits for the running one */
  guint generation;             /* of the plan and settings charted */
  guint compute_count;
  guint syncing;
};

G_DEFINE_FINAL_TYPE (HlChartsView, hl_charts_view, GTK_TYPE_WIDGET)

enum {
  PROP_0,
  PROP_KIND,
  PROP_SHOW_BANDS,
  N_PROPS
};

static GParamSpec *properties[N_PROPS];

enum {
  SIGNAL_COMPUTED,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

/* ---- computing ------------------------------------------------------ */

static char *
format_error (const HlError *err)
{
  const char *msg = err->message[0] != '\0' ? err->message : hl_status_name (err->status);

  if (err->field[0] != '\0' && strstr (msg, err->field) == NULL)
    return g_strdup_printf ("%s: %s", err->field, msg);
  return g_strdup (msg);
}

static void
update_info (HlChartsView *self)
{
  g_autofree char *text = NULL;

  if (self->error != NULL)
    {
      text = g_strdup_printf (_("Cannot chart this plan: %s"), self->error);
      gtk_widget_add_css_class (self->info_label, "error");
    }
  else
    {
      gtk_widget_remove_css_class (self->info_label, "error");
      if (self->kind == HL_CHART_FEMORAL_OFFSET && self->plan != NULL
          && self->plan->n_options == 0)
        text = g_strdup (_("Only the native hip: add a reconstruction option to chart its femoral offset change."));
      else if (self->data != NULL && self->data->bands != NULL)
        text = g_strdup_printf (_("Bands: %zu Monte Carlo samples at each of %zu points, seed %" PRIu64),
                                self->data->band_samples, self->data->n_band_steps,
                                self->data->band_info.seed);
      else
        text = g_strdup ("");
    }
  gtk_label_set_text (GTK_LABEL (self->info_label), text);
}

/* One computation, on a copy of the plan in a worker thread. */
typedef struct {
  HlPlan *plan;
  HlChartKind kind;
  gboolean bands;
  HlMcSettings mc;
  guint generation;
  HlChartData *data;
  HlError err;
} HlChartJob;

static void
chart_job_free (gpointer user_data)
{
  HlChartJob *job = user_data;

  hl_plan_free (job->plan);
  g_clear_pointer (&job->data, hl_chart_data_free);
  g_free (job);
}

static void
chart_thread_cb (GTask *task, gpointer source, gpointer user_data, GCancellable *cancel)
{
  HlChartJob *job = user_data;

  hl_worker_lower_priority ();

  if (g_cancellable_is_cancelled (cancel))
    return;
  job->data = hl_chart_data_new (job->plan, job->kind, HL_CHART_STEPS_DEFAULT,
                                 HL_CHART_BAND_STEPS_DEFAULT,
                                 job->bands ? &job->mc : NULL, &job->err);
}

static void hl_charts_view_compute (HlChartsView *self);

static void
chart_done_cb (GObject *source, GAsyncResult *result, gpointer user_data)
{
  HlChartsView *self = HL_CHARTS_VIEW (source);
  GTask *task = G_TASK (result);
  HlChartJob *job = g_task_get_task_data (task);

  self->running = FALSE;
  g_clear_object (&self->cancel);
  /* Only the numbers of the plan as it is now are shown. */
  if (!g_cancellable_is_cancelled (g_task_get_cancellable (task))
      && job->generation == self->generation)
    {
      g_clear_pointer (&self->data, hl_chart_data_free);
      g_clear_pointer (&self->error, g_free);
      self->data = g_steal_pointer (&job->data);
      self->compute_count++;
      if (self->data == NULL)
        self->error = format_error (&job->err);
      update_info (self);
      gtk_widget_queue_draw (GTK_WIDGET (self));
      g_signal_emit (self, signals[SIGNAL_COMPUTED], 0);
    }
  if (self->wanted && gtk_widget_get_mapped (GTK_WIDGET (self)))
    hl_charts_view_compute (self);
}

static gboolean
compute_later_cb (gpointer user_data)
{
  HlChartsView *self = user_data;

  self->later = 0;
  if (gtk_widget_get_mapped (GTK_WIDGET (self)))
    hl_charts_view_compute (self);
  else
    self->stale = TRUE;
  return G_SOURCE_REMOVE;
}

/* Starts the core for the plan as it is now; the drawing keeps the last
 * numbers until these come.  With one running, that one is cancelled and
 * this runs when it ends: never more than one at a time. */
static void
hl_charts_view_compute (HlChartsView *self)
{
  g_autoptr(GTask) task = NULL;
  HlChartJob *job;

  self->stale = FALSE;
  if (self->later != 0)
    return;
  if (self->document != NULL && hl_document_is_dragging (self->document)
      && g_get_monotonic_time () - self->last_start_us < CHARTS_DRAG_INTERVAL_MS * 1000)
    {
      self->later = g_timeout_add (CHARTS_DRAG_INTERVAL_MS, compute_later_cb, self);
      return;
    }
  if (self->running)
    {
      g_cancellable_cancel (self->cancel);
      self->wanted = TRUE;
      return;
    }
  self->wanted = FALSE;
  if (self->plan == NULL)
    {
      g_clear_pointer (&self->data, hl_chart_data_free);
      g_clear_pointer (&self->error, g_free);
      update_info (self);
      gtk_widget_queue_draw (GTK_WIDGET (self));
      return;
    }
  job = g_new0 (HlChartJob, 1);
  job->plan = hl_plan_copy (self->plan);
  job->kind = self->kind;
  job->bands = self->show_bands;
  job->generation = self->generation;
  hl_error_clear (&job->err);
  hl_mc_settings_for_plan (self->plan, &job->mc, NULL);
  /* The bands are smooth: fewer samples than a full run do. */
  job->mc.n_samples = MIN (job->mc.n_samples, (size_t) HL_CHART_BAND_SAMPLES_DEFAULT);
  if (job->plan == NULL)
    {
      chart_job_free (job);
      g_clear_pointer (&self->data, hl_chart_data_free);
      g_free (self->error);
      self->error = g_strdup (_("there is not enough memory for the charts"));
      update_info (self);
      return;
    }
  self->running = TRUE;
  self->last_start_us = g_get_monotonic_time ();
  self->cancel = g_cancellable_new ();
  task = g_task_new (self, self->cancel, chart_done_cb, NULL);
  g_task_set_source_tag (task, hl_charts_view_compute);
  g_task_set_task_data (task, job, chart_job_free);
  g_task_set_check_cancellable (task, FALSE);
  g_task_run_in_thread (task, chart_thread_cb);
}

static void
hl_charts_view_invalidate (HlChartsView *self)
{
  self->generation++;
  self->stale = TRUE;
  if (gtk_widget_get_mapped (GTK_WIDGET (self)))
    hl_charts_view_compute (self);
}

/* ---- public --------------------------------------------------------- */

GtkWidget *
hl_charts_view_new (void)
{
  return g_object_new (HL_TYPE_CHARTS_VIEW, NULL);
}

void
hl_charts_view_set_plan (HlChartsView *self, const HlPlan *plan)
{
  g_return_if_fail (HL_IS_CHARTS_VIEW (self));
  self->plan = plan;
  hl_charts_view_invalidate (self);
}

static void
document_changed_cb (HlDocument *document, guint what, HlChartsView *self)
{
  if (what & HL_DOCUMENT_CHANGED_PLAN)
    hl_charts_view_invalidate (self);
}

void
hl_charts_view_set_document (HlChartsView *self, HlDocument *document)
{
  g_return_if_fail (HL_IS_CHARTS_VIEW (self));
  g_return_if_fail (HL_IS_DOCUMENT (document));
  self->document = document;
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  hl_charts_view_set_plan (self, hl_document_get_plan (document));
}

gboolean
hl_charts_view_get_busy (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), FALSE);
  return self->running || self->later != 0
         || (self->stale && gtk_widget_get_mapped (GTK_WIDGET (self)));
}

void
hl_charts_view_plan_changed (HlChartsView *self)
{
  g_return_if_fail (HL_IS_CHARTS_VIEW (self));
  hl_charts_view_invalidate (self);
}

void
hl_charts_view_set_kind (HlChartsView *self, HlChartKind kind)
{
  g_return_if_fail (HL_IS_CHARTS_VIEW (self));
  g_return_if_fail (kind < HL_CHART_N);

  if (kind == self->kind)
    return;
  self->kind = kind;
  self->syncing++;
  gtk_drop_down_set_selected (GTK_DROP_DOWN (self->kind_drop), (guint) kind);
  self->syncing--;
  {
    g_autofree char *label = g_strdup_printf (_("Charts of joint reaction force and abductor force: %s"),
                                              hl_chart_kind_title (kind));

    gtk_accessible_update_property (GTK_ACCESSIBLE (self), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                    label, -1);
  }
  hl_charts_view_invalidate (self);
  g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_KIND]);
}

HlChartKind
hl_charts_view_get_kind (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), HL_CHART_FEMORAL_OFFSET);
  return self->kind;
}

void
hl_charts_view_set_show_bands (HlChartsView *self, gboolean show)
{
  g_return_if_fail (HL_IS_CHARTS_VIEW (self));

  show = !!show;
  if (show == self->show_bands)
    return;
  self->show_bands = show;
  self->syncing++;
  gtk_check_button_set_active (GTK_CHECK_BUTTON (self->bands_check), show);
  self->syncing--;
  hl_charts_view_invalidate (self);
  g_object_notify_by_pspec (G_OBJECT (self), properties[PROP_SHOW_BANDS]);
}

gboolean
hl_charts_view_get_show_bands (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), FALSE);
  return self->show_bands;
}

guint
hl_charts_view_get_compute_count (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), 0);
  return self->compute_count;
}

const char *
hl_charts_view_get_error (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), NULL);
  return self->error;
}

GtkWidget *
hl_charts_view_get_kind_drop (HlChartsView *self)
{
  g_return_val_if_fail (HL_IS_CHARTS_VIEW (self), NULL);
  return self->kind_drop;
}

/* ---- callbacks ------------------------------------------------------ */

static void
kind_selected_cb (GtkDropDown *drop, GParamSpec *pspec, HlChartsView *self)
{
  guint kind = gtk_drop_down_get_selected (drop);

  if (self->syncing == 0 && kind < HL_CHART_N)
    hl_charts_view_set_kind (self, (HlChartKind) kind);
}

static void
bands_toggled_cb (GtkCheckButton *check, GParamSpec *pspec, HlChartsView *self)
{
  if (self->syncing == 0)
    hl_charts_view_set_show_bands (self, gtk_check_button_get_active (check));
}

/* ---- GtkWidget ------------------------------------------------------ */

static void
chart_style (HlChartsView *self, HlChartStyle *style)
{
  GtkStyleContext *ctx = gtk_widget_get_style_context (GTK_WIDGET (self));
  GdkRGBA fg;
  double lum, grid_alpha;

  gtk_style_context_get_color (ctx, &fg);
  lum = 0.2126 * fg.red + 0.7152 * fg.green + 0.0722 * fg.blue;
  hl_chart_style_init (style, lum > DARK_LUMINANCE);
  grid_alpha = style->grid.a;
  style->fg = (HlRgba) { fg.red, fg.green, fg.blue, 1.0 };
  style->grid = style->fg;
  style->grid.a = grid_alpha;
  style->paint_background = FALSE;
  style->show_title = FALSE;
  style->show_legend = FALSE;
  style->show_bands = self->show_bands;
  style->font_px = CHART_FONT_PX;
}

static void
hl_charts_view_snapshot (GtkWidget *widget, GtkSnapshot *snapshot)
{
  HlChartsView *self = HL_CHARTS_VIEW (widget);
  int width = gtk_widget_get_width (widget);
  int height = gtk_widget_get_height (widget);
  int bar_h = gtk_widget_get_height (self->bar);
  double top = bar_h, h = height - bar_h, legend_h = 0.0;
  HlChartStyle style;
  cairo_t *cr;

  gtk_widget_snapshot_child (widget, self->bar, snapshot);
  /* Computed on map and on plan changes while mapped: never here. */
  if (width <= 0 || h <= 0)
    return;

  chart_style (self, &style);
  cr = gtk_snapshot_append_cairo (snapshot, &GRAPHENE_RECT_INIT (0, (float) top, (float) width,
                                                                 (float) h));
  if (self->data != NULL)
    {
      legend_h = hl_chart_draw_legend (cr, self->data, &style, CHART_GAP_PX, 0,
                                       width - 2 * CHART_GAP_PX, style.show_bands, FALSE);
      hl_chart_draw_legend (cr, self->data, &style, CHART_GAP_PX, top + h - legend_h,
                            width - 2 * CHART_GAP_PX, style.show_bands, TRUE);
      h -= legend_h + CHART_GAP_PX;
    }
  if (width >= CHARTS_SIDE_BY_SIDE_MIN_PX)
    {
      double w = (width - CHART_GAP_PX) / 2.0;

      hl_chart_draw (cr, self->data, HL_CHART_JRF, &style, 0, top, w, h);
      hl_chart_draw (cr, self->data, HL_CHART_ABDUCTOR, &style, w + CHART_GAP_PX, top, w, h);
    }
  else
    {
      double hh = (h - CHART_GAP_PX) / 2.0;

      hl_chart_draw (cr, self->data, HL_CHART_JRF, &style, 0, top, width, hh);
      hl_chart_draw (cr, self->data, HL_CHART_ABDUCTOR, &style, 0, top + hh + CHART_GAP_PX,
                     width, hh);
    }
  cairo_destroy (cr);
}

static void
hl_charts_view_measure (GtkWidget *widget, GtkOrientation orientation, int for_size,
                        int *minimum, int *natural, int *minimum_baseline,
                        int *natural_baseline)
{
  HlChartsView *self = HL_CHARTS_VIEW (widget);
  int bar_min, bar_nat;

  gtk_widget_measure (self->bar, orientation, -1, &bar_min, &bar_nat, NULL, NULL);
  if (orientation == GTK_ORIENTATION_HORIZONTAL)
    {
      *minimum = MAX (bar_min, CHART_MIN_WIDTH_PX);
      *natural = MAX (bar_nat, CHART_NAT_WIDTH_PX);
    }
  else
    {
      *minimum = bar_min + CHART_MIN_HEIGHT_PX;
      *natural = bar_nat + CHART_NAT_HEIGHT_PX;
    }
}

static void
hl_charts_view_size_allocate (GtkWidget *widget, int width, int height, int baseline)
{
  HlChartsView *self = HL_CHARTS_VIEW (widget);
  int bar_h;

  gtk_widget_measure (self->bar, GTK_ORIENTATION_VERTICAL, width, NULL, &bar_h, NULL, NULL);
  gtk_widget_size_allocate (self->bar, &(GtkAllocation) { 0, 0, width, bar_h }, -1);
}

static void
hl_charts_view_map (GtkWidget *widget)
{
  HlChartsView *self = HL_CHARTS_VIEW (widget);

  GTK_WIDGET_CLASS (hl_charts_view_parent_class)->map (widget);
  if (self->stale)
    hl_charts_view_compute (self);
}

static void
hl_charts_view_css_changed (GtkWidget *widget, GtkCssStyleChange *change)
{
  GTK_WIDGET_CLASS (hl_charts_view_parent_class)->css_changed (widget, change);
  gtk_widget_queue_draw (widget);
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_charts_view_get_property (GObject *object, guint prop_id, GValue *value,
                             GParamSpec *pspec)
{
  HlChartsView *self = HL_CHARTS_VIEW (object);

  switch (prop_id)
    {
    case PROP_KIND:
      g_value_set_int (value, (int) self->kind);
      break;
    case PROP_SHOW_BANDS:
      g_value_set_boolean (value, self->show_bands);
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_charts_view_set_property (GObject *object, guint prop_id, const GValue *value,
                             GParamSpec *pspec)
{
  HlChartsView *self = HL_CHARTS_VIEW (object);

  switch (prop_id)
    {
    case PROP_KIND:
      hl_charts_view_set_kind (self, (HlChartKind) g_value_get_int (value));
      break;
    case PROP_SHOW_BANDS:
      hl_charts_view_set_show_bands (self, g_value_get_boolean (value));
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, prop_id, pspec);
    }
}

static void
hl_charts_view_dispose (GObject *object)
{
  HlChartsView *self = HL_CHARTS_VIEW (object);

  if (self->cancel != NULL)
    g_cancellable_cancel (self->cancel);
  self->wanted = FALSE;
  g_clear_handle_id (&self->later, g_source_remove);
  g_clear_pointer (&self->bar, gtk_widget_unparent);
  G_OBJECT_CLASS (hl_charts_view_parent_class)->dispose (object);
}

static void
hl_charts_view_finalize (GObject *object)
{
  HlChartsView *self = HL_CHARTS_VIEW (object);

  g_clear_pointer (&self->data, hl_chart_data_free);
  g_clear_pointer (&self->error, g_free);
  g_clear_object (&self->cancel);
  G_OBJECT_CLASS (hl_charts_view_parent_class)->finalize (object);
}

static void
hl_charts_view_class_init (HlChartsViewClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->get_property = hl_charts_view_get_property;
  object_class->set_property = hl_charts_view_set_property;
  object_class->dispose = hl_charts_view_dispose;
  object_class->finalize = hl_charts_view_finalize;
  widget_class->snapshot = hl_charts_view_snapshot;
  widget_class->measure = hl_charts_view_measure;
  widget_class->size_allocate = hl_charts_view_size_allocate;
  widget_class->map = hl_charts_view_map;
  widget_class->css_changed = hl_charts_view_css_changed;

  properties[PROP_KIND] =
    g_param_spec_int ("kind", NULL, NULL, 0, HL_CHART_N - 1, HL_CHART_FEMORAL_OFFSET,
                      G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  properties[PROP_SHOW_BANDS] =
    g_param_spec_boolean ("show-bands", NULL, NULL, TRUE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, properties);
  signals[SIGNAL_COMPUTED] = g_signal_new ("computed", G_TYPE_FROM_CLASS (klass),
                                           G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                           G_TYPE_NONE, 0);

  gtk_widget_class_set_css_name (widget_class, "hlchartsview");
  gtk_widget_class_set_accessible_role (widget_class, GTK_ACCESSIBLE_ROLE_IMG);
}

static void
hl_charts_view_init (HlChartsView *self)
{
  g_autoptr(GtkStringList) kinds = gtk_string_list_new (NULL);
  GtkWidget *row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, BAR_SPACING);
  GtkWidget *bands_row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, BAR_SPACING);
  GtkWidget *against = gtk_label_new (_("Against:"));
  g_autofree char *label = NULL;

  self->kind = HL_CHART_FEMORAL_OFFSET;
  self->show_bands = TRUE;
  self->stale = TRUE;

  self->bar = gtk_box_new (GTK_ORIENTATION_VERTICAL, BAR_SPACING);
  gtk_widget_set_margin_start (self->bar, BAR_SPACING);
  gtk_widget_set_margin_end (self->bar, BAR_SPACING);
  gtk_widget_set_margin_top (self->bar, BAR_SPACING);
  gtk_widget_set_margin_bottom (self->bar, BAR_SPACING);
  gtk_widget_add_css_class (against, "dim-label");
  gtk_box_append (GTK_BOX (row), against);
  for (int k = 0; k < HL_CHART_N; k++)
    gtk_string_list_append (kinds, _(kind_labels[k]));
  self->kind_drop = gtk_drop_down_new (G_LIST_MODEL (g_object_ref (kinds)), NULL);
  gtk_drop_down_set_selected (GTK_DROP_DOWN (self->kind_drop), (guint) self->kind);
  gtk_accessible_update_property (GTK_ACCESSIBLE (self->kind_drop), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                  _("Chart against"), -1);
  g_signal_connect (self->kind_drop, "notify::selected", G_CALLBACK (kind_selected_cb), self);
  gtk_box_append (GTK_BOX (row), self->kind_drop);
  gtk_box_append (GTK_BOX (self->bar), row);
  self->bands_check = gtk_check_button_new_with_label (_("5–95% bands"));
  gtk_check_button_set_active (GTK_CHECK_BUTTON (self->bands_check), self->show_bands);
  g_signal_connect (self->bands_check, "notify::active", G_CALLBACK (bands_toggled_cb), self);
  gtk_box_append (GTK_BOX (bands_row), self->bands_check);
  self->info_label = gtk_label_new (NULL);
  gtk_label_set_xalign (GTK_LABEL (self->info_label), 0.0f);
  gtk_label_set_wrap (GTK_LABEL (self->info_label), TRUE);
  gtk_label_set_wrap_mode (GTK_LABEL (self->info_label), PANGO_WRAP_WORD_CHAR);
  gtk_widget_set_hexpand (self->info_label, TRUE);
  gtk_widget_add_css_class (self->info_label, "dim-label");
  gtk_widget_add_css_class (self->info_label, "caption");
  gtk_box_append (GTK_BOX (bands_row), self->info_label);
  gtk_box_append (GTK_BOX (self->bar), bands_row);
  gtk_widget_set_parent (self->bar, GTK_WIDGET (self));

  label = g_strdup_printf (_("Charts of joint reaction force and abductor force: %s"),
                           hl_chart_kind_title (self->kind));
  gtk_accessible_update_property (GTK_ACCESSIBLE (self), GTK_ACCESSIBLE_PROPERTY_LABEL,
                                  label, -1);
}

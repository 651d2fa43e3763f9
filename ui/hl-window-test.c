/* hl-window-test.c: the screenshot, results-printing and drag-benchmark
 * modes, and the handle positions the GUI tests drive the window by.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * HIPLEVER_TEST_PRINT_HANDLES=1 prints, after each frame in which
 * something moved, lines in surface coordinates of the window (those of
 * `xdotool mousemove --window`):
 *   HANDLE <landmark-key> <x> <y>   placed landmarks of the native hip
 *   WIDGET <name> <x> <y>           centres of the controls tests click
 *                                   (page-<name>, cane-check, add-option,
 *                                   duplicate-option, remove-option,
 *                                   option-name, mass-spin, mass-unit,
 *                                   caution-toggle, caution-short or
 *                                   caution-full (whichever is shown),
 *                                   side, lm-x-<key>,
 *                                   lm-y-<key>)
 *   SELECTED <canvas> <table>       the landmark selected in each, or none
 *   FRAME <n>                       ends each block
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-window-test"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include <time.h>
#include <unistd.h>
#include <glib/gi18n.h>
#include <glib/gstdio.h>

#include "hl-a11y.h"
#include "hl-charts-view.h"
#include "hl-application.h"
#include "hl-plan-io.h"
#include "hl-radiograph-page.h"
#include "hl-window.h"
#include "hl-window-private.h"
#include "hl-render-template.h"
#include "hl-template-panel.h"

/* Frames to let the window settle (map, first layout, fonts) before a
 * screenshot, then a short wait for late redraws. */
#define HL_SCREENSHOT_SETTLE_FRAMES 3
#define HL_SCREENSHOT_DELAY_MS 150
#define HL_SCREENSHOT_MAX_CORRECTIONS 3
/* Frames in which printed positions could still move after a change. */
#define HL_PRINT_SETTLE_FRAMES 2
/* How often a test output looks whether the analysis has come. */
#define HL_ANALYSIS_POLL_MS 10
/* The drag benchmark: frames, options and the lateral travel per frame. */
#define HL_BENCH_FRAMES 200
#define HL_BENCH_OPTIONS 4
#define HL_BENCH_STEP_MM 0.05
#define HL_BENCH_P95 0.95
/* The radiograph under the drag, px: the size of a digitised hip film. */
#define HL_BENCH_IMAGE_W 3000
#define HL_BENCH_IMAGE_H 2500

static HlApplication *
window_app (HlWindow *self)
{
  return HL_APPLICATION (gtk_window_get_application (GTK_WINDOW (self)));
}

void
hl_window_write_dump (HlWindow *self)
{
  HlError err;

  if (self->dump_path == NULL)
    return;
  hl_error_clear (&err);
  if (hl_summary_save_file (hl_window_get_plan (self), self->dump_path, &err) != HL_OK)
    {
      g_autofree char *msg = hl_window_format_error (&err);

      g_printerr (_("hiplever: could not write the summary to %s: %s\n"),
                  self->dump_path, msg);
    }
}

/* ---- handle positions ----------------------------------------------- */

static gboolean
surface_point (HlWindow *self, GtkWidget *widget, double x, double y,
               double *sx, double *sy)
{
  graphene_point_t in = GRAPHENE_POINT_INIT ((float) x, (float) y);
  graphene_point_t out;
  double tx, ty;

  if (!gtk_widget_get_mapped (widget)
      || !gtk_widget_compute_point (widget, GTK_WIDGET (self), &in, &out))
    return FALSE;
  gtk_native_get_surface_transform (GTK_NATIVE (self), &tx, &ty);
  *sx = out.x + tx;
  *sy = out.y + ty;
  return TRUE;
}

static void
print_widget (HlWindow *self, const char *name, GtkWidget *widget)
{
  double x, y;

  if (widget != NULL
      && surface_point (self, widget, gtk_widget_get_width (widget) / 2.0,
                        gtk_widget_get_height (widget) / 2.0, &x, &y))
    printf ("WIDGET %s %.0f %.0f\n", name, x, y);
}

/* "AREA name X Y W H": a widget's place and size. */
static void
print_area (HlWindow *self, const char *name, GtkWidget *widget)
{
  double x, y;

  if (widget != NULL && surface_point (self, widget, 0, 0, &x, &y))
    printf ("AREA %s %.0f %.0f %d %d\n", name, x, y,
            gtk_widget_get_width (widget), gtk_widget_get_height (widget));
}

/* The stack switcher's button of the page holding `child`. */
static void
print_switcher_button (HlWindow *self, const char *name, GtkStack *stack, GtkWidget *child)
{
  GtkWidget *switcher = gtk_widget_get_prev_sibling (GTK_WIDGET (stack));
  g_autoptr(GtkSelectionModel) pages = gtk_stack_get_pages (stack);
  GtkWidget *button = switcher != NULL ? gtk_widget_get_first_child (switcher) : NULL;
  guint n = g_list_model_get_n_items (G_LIST_MODEL (pages));

  for (guint i = 0; i < n && button != NULL; i++, button = gtk_widget_get_next_sibling (button))
    {
      g_autoptr(GObject) page = g_list_model_get_item (G_LIST_MODEL (pages), i);

      if (gtk_stack_page_get_child (GTK_STACK_PAGE (page)) == child)
        {
          print_widget (self, name, button);
          return;
        }
    }
}

/* The lower area: its switcher, the charts' dropdown, what they show and
 * where they are. */
static void
print_lower_handles (HlWindow *self)
{
  HlChartsView *charts = HL_CHARTS_VIEW (self->charts_view);
  const char *error = hl_charts_view_get_error (charts);
  double x, y;

  print_switcher_button (self, "lower-results", self->lower_stack,
                         gtk_stack_get_child_by_name (self->lower_stack, "results"));
  print_switcher_button (self, "lower-charts", self->lower_stack,
                         gtk_stack_get_child_by_name (self->lower_stack, "charts"));
  print_widget (self, "chart-kind", hl_charts_view_get_kind_drop (charts));
  printf ("CHARTS %d %u %s\n", (int) hl_charts_view_get_kind (charts),
          hl_charts_view_get_compute_count (charts), error != NULL ? "error" : "ok");
  if (surface_point (self, self->charts_view, 0, 0, &x, &y))
    printf ("AREA charts-view %.0f %.0f %d %d\n", x, y,
            gtk_widget_get_width (self->charts_view), gtk_widget_get_height (self->charts_view));
}

static void
print_template_control (const char *name, GtkWidget *widget, gpointer self)
{
  print_widget (self, name, widget);
}

/* The template's handles, its panel's controls and how its ranking is. */
static void
print_template (HlWindow *self)
{
  GtkWidget *panel = hl_options_page_get_template_panel (self->options_page);
  for (int part = 0; part < HL_TEMPLATE_PART_N; part++)
    {
      static const char *names[] = { "template-cup", "template-inclination", "template-stem" };
      double wx, wy, x, y;
      if (hl_canvas_template_handle_to_widget (self->canvas, part, &wx, &wy)
          && surface_point (self, GTK_WIDGET (self->canvas), wx, wy, &x, &y))
        printf ("HANDLE %s %.0f %.0f\n", names[part], x, y);
    }
  if (panel == NULL)
    return;
  hl_template_panel_foreach_control (panel, print_template_control, self);
  int sel = hl_canvas_get_selected_option (self->canvas);
  const HlTemplate *tm = sel >= 0 && (size_t) sel < hl_window_get_plan (self)->n_options
                         && hl_window_get_plan (self)->options[sel].recon.tmpl.on
                         ? &hl_window_get_plan (self)->options[sel].recon.tmpl : NULL;
  printf ("TEMPLATE selected %d ranked %u busy %d rank-ms %.1f cup-x %.3f cup-mm %.0f "
          "inclination %.2f stem %s seat %.3f\n",
          hl_canvas_get_selected_template (self->canvas),
          hl_template_panel_get_n_ranked (panel), hl_template_panel_get_busy (panel),
          hl_template_panel_get_rank_ms (panel), tm ? tm->cup_x_mm : NAN,
          tm ? tm->cup_diameter_mm : NAN, tm ? tm->inclination_deg : NAN,
          tm ? tm->stem_size : "-", tm ? tm->seat_mm : NAN);
}

void
hl_window_print_handles (HlWindow *self)
{
  g_autoptr(GListModel) pages = G_LIST_MODEL (gtk_stack_get_pages (self->panel_stack));
  const HlLandmarks *lm = &hl_window_get_plan (self)->landmarks;
  GtkWidget *switcher = gtk_widget_get_prev_sibling (GTK_WIDGET (self->panel_stack));
  GtkWidget *child;
  guint page = 0;

  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      double wx, wy, x, y;

      if (!hl_landmarks_has (lm, (HlLandmarkId) i)
          || !hl_canvas_plan_to_widget (self->canvas, lm->p[i].x, lm->p[i].y, &wx, &wy)
          || !surface_point (self, GTK_WIDGET (self->canvas), wx, wy, &x, &y))
        continue;
      printf ("HANDLE %s %.0f %.0f\n", hl_landmark_info ((HlLandmarkId) i)->key, x, y);
    }
  /* The switcher has one button per page, in the pages' order. */
  for (child = switcher != NULL ? gtk_widget_get_first_child (switcher) : NULL;
       child != NULL && page < g_list_model_get_n_items (pages);
       child = gtk_widget_get_next_sibling (child), page++)
    {
      g_autoptr(GObject) item = g_list_model_get_item (pages, page);
      g_autofree char *name = g_strdup_printf ("page-%s",
                                               gtk_stack_page_get_name (GTK_STACK_PAGE (item)));

      print_widget (self, name, child);
    }
  print_widget (self, "canvas", GTK_WIDGET (self->canvas));
  print_area (self, "canvas", GTK_WIDGET (self->canvas));
  print_area (self, "lower", gtk_widget_get_next_sibling (gtk_widget_get_next_sibling (GTK_WIDGET (self->canvas))));
  print_widget (self, "caution-toggle", GTK_WIDGET (self->caution_toggle));
  if (gtk_revealer_get_reveal_child (self->caution_revealer))
    print_widget (self, "caution-full", GTK_WIDGET (self->caution_full_label));
  print_widget (self, "caution-short", GTK_WIDGET (self->caution_short_label));
  hl_aids_page_print_handles (self->aids_page);
  hl_options_page_print_handles (self->options_page);
  hl_case_page_print_handles (self->case_page);
  hl_landmarks_page_print_handles (self->landmarks_page);
  {
    int on_canvas = hl_canvas_get_selected_landmark (self->canvas);
    int in_table = hl_landmarks_page_get_selected_landmark (self->landmarks_page);

    printf ("SELECTED %s %s\n",
            on_canvas >= 0 ? hl_landmark_info ((HlLandmarkId) on_canvas)->key : "none",
            in_table >= 0 ? hl_landmark_info ((HlLandmarkId) in_table)->key : "none");
  }
  if (g_strcmp0 (g_getenv ("HIPLEVER_TEST_PRINT_A11Y"), "1") == 0)
    {
      /* What a screen reader is told, as GTK holds it (needs GTK_A11Y=test):
       * the check against "" returns the value it holds. */
      g_autofree char *label = gtk_test_accessible_check_property (GTK_ACCESSIBLE (self->canvas),
                                                                   GTK_ACCESSIBLE_PROPERTY_LABEL, "");

      printf ("ACCESSIBLE canvas %s\n", label != NULL ? label : "");
    }
  hl_radiograph_page_print_handles (self->radiograph_page);
  hl_results_print_handles (self->results);
  print_lower_handles (self);
  hl_analysis_panel_print_handles (self->analysis_panel);
  print_template (self);
  printf ("STATUS %s\n", gtk_label_get_text (self->status_label));
  printf ("FRAME %u\n", ++self->handles_printed);
  fflush (stdout);
}

static gboolean
print_handles_tick_cb (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  HlWindow *self = HL_WINDOW (widget);
  guint *settle = user_data;

  if (self->handles_dirty)
    {
      self->handles_dirty = FALSE;
      *settle = HL_PRINT_SETTLE_FRAMES;
    }
  else if (*settle > 0 && --*settle == 0)
    hl_window_print_handles (self);
  return G_SOURCE_CONTINUE;
}

static void
panel_page_cb (GtkStack *stack, GParamSpec *pspec, HlWindow *self)
{
  self->handles_dirty = TRUE;
}

static void
canvas_resized_cb (GtkWidget *canvas, GParamSpec *pspec, HlWindow *self)
{
  self->handles_dirty = TRUE;
}

static void
results_view_cb (HlResults *results, HlWindow *self)
{
  self->handles_dirty = TRUE;
}

void
hl_window_start_print_handles (HlWindow *self)
{
  g_signal_connect_object (self->panel_stack, "notify::visible-child",
                           G_CALLBACK (panel_page_cb), self, 0);
  g_signal_connect_object (self, "notify::default-width",
                           G_CALLBACK (canvas_resized_cb), self, 0);
  g_signal_connect_object (self->results, "view-changed",
                           G_CALLBACK (results_view_cb), self, 0);
  gtk_widget_add_tick_callback (GTK_WIDGET (self), print_handles_tick_cb,
                                g_new0 (guint, 1), g_free);
}

/* ---- screenshot ----------------------------------------------------- */

typedef struct {
  HlWindow *self;
  char *path;
  guint frames;
  int target_w;           /* the size asked for */
  int target_h;
  int corrections;
} HlShot;

static void
hl_shot_free (gpointer data)
{
  HlShot *shot = data;

  g_free (shot->path);
  g_free (shot);
}

static gboolean
save_window_png (HlWindow *self, const char *path, GError **error)
{
  GtkWidget *widget = GTK_WIDGET (self);
  int w = gtk_widget_get_width (widget);
  int h = gtk_widget_get_height (widget);
  int scale = gtk_widget_get_scale_factor (widget);
  g_autoptr(GdkPaintable) paintable = NULL;
  g_autoptr(GskRenderNode) node = NULL;
  g_autoptr(GdkTexture) texture = NULL;
  GtkSnapshot *snapshot;
  GskRenderer *renderer;

  if (w <= 0 || h <= 0)
    {
      g_set_error (error, G_IO_ERROR, G_IO_ERROR_FAILED,
                   _("the window has no size yet"));
      return FALSE;
    }
  renderer = gtk_native_get_renderer (GTK_NATIVE (self));
  if (renderer == NULL)
    {
      g_set_error (error, G_IO_ERROR, G_IO_ERROR_FAILED,
                   _("the window has no renderer"));
      return FALSE;
    }
  paintable = gtk_widget_paintable_new (widget);
  snapshot = gtk_snapshot_new ();
  /* Render at the device scale so a HiDPI screenshot is sharp. */
  gtk_snapshot_scale (snapshot, (float) scale, (float) scale);
  gdk_paintable_snapshot (paintable, GDK_SNAPSHOT (snapshot), w, h);
  node = gtk_snapshot_free_to_node (snapshot);
  if (node == NULL)
    {
      g_set_error (error, G_IO_ERROR, G_IO_ERROR_FAILED,
                   _("the window drew nothing"));
      return FALSE;
    }
  texture = gsk_renderer_render_texture (renderer, node,
                                         &GRAPHENE_RECT_INIT (0, 0, (float) (w * scale),
                                                              (float) (h * scale)));
  if (texture == NULL || !gdk_texture_save_to_png (texture, path))
    {
      g_set_error (error, G_IO_ERROR, G_IO_ERROR_FAILED,
                   _("could not write the PNG file"));
      return FALSE;
    }
  return TRUE;
}

/* The ranges come from a worker thread: outputs for tests wait for the
 * run of the current state. */
static gboolean
analysis_pending (HlWindow *self)
{
  gboolean pending = FALSE;

  hl_document_get_ranges (self->document, NULL, NULL, &pending);
  return pending;
}

static gboolean
screenshot_timeout_cb (gpointer user_data)
{
  HlShot *shot = user_data;
  g_autoptr(GError) error = NULL;
  int status;

  /* The picture shows the ranges of the plan, not an earlier state. */
  if (analysis_pending (shot->self))
    return G_SOURCE_CONTINUE;
  status = hl_a11y_run_test_hooks (GTK_WIDGET (shot->self));

  if (!save_window_png (shot->self, shot->path, &error))
    {
      g_printerr (_("hiplever: screenshot %s failed: %s\n"), shot->path, error->message);
      status = 1;
    }
  hl_window_write_dump (shot->self);
  hl_application_finish (window_app (shot->self), status);
  return G_SOURCE_REMOVE;
}

static gboolean
screenshot_tick_cb (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  HlShot *shot = user_data;

  int dw, dh;

  if (++shot->frames < HL_SCREENSHOT_SETTLE_FRAMES)
    return G_SOURCE_CONTINUE;
  /* Window decorations take their share of the default size: ask again
   * for the difference so the picture has the size asked for. */
  if ((gtk_widget_get_width (widget) != shot->target_w
       || gtk_widget_get_height (widget) != shot->target_h)
      && shot->corrections++ < HL_SCREENSHOT_MAX_CORRECTIONS)
    {
      gtk_window_get_default_size (GTK_WINDOW (widget), &dw, &dh);
      gtk_window_set_default_size (GTK_WINDOW (widget),
                                   dw + shot->target_w - gtk_widget_get_width (widget),
                                   dh + shot->target_h - gtk_widget_get_height (widget));
      shot->frames = 0;
      return G_SOURCE_CONTINUE;
    }
  g_timeout_add_full (G_PRIORITY_DEFAULT_IDLE, HL_SCREENSHOT_DELAY_MS,
                      screenshot_timeout_cb, shot, hl_shot_free);
  return G_SOURCE_REMOVE;
}

void
hl_window_run_screenshot (HlWindow *self, const char *png_path)
{
  HlShot *shot = g_new0 (HlShot, 1);

  shot->self = self;
  shot->path = g_strdup (png_path);
  gtk_window_get_default_size (GTK_WINDOW (self), &shot->target_w, &shot->target_h);
  self->skip_close_guard = TRUE;
  gtk_widget_add_tick_callback (GTK_WIDGET (self), screenshot_tick_cb, shot, NULL);
}

/* ---- results as text ------------------------------------------------ */

static gboolean
print_results_idle_cb (gpointer user_data)
{
  HlWindow *self = HL_WINDOW (user_data);

  if (analysis_pending (self))
    return G_SOURCE_CONTINUE;
  size_t n;
  const HlSolved *solved = hl_document_get_solved (self->document, &n);
  g_autofree char *csv = hl_results_format_csv (hl_window_get_plan (self), solved, n);
  g_autofree char *ranges = hl_results_format_ranges_csv (self->results);

  fputs (csv, stdout);
  fputs (ranges, stdout);
  fflush (stdout);
  hl_window_write_dump (self);
  hl_application_finish (window_app (self), 0);
  return G_SOURCE_REMOVE;
}

void
hl_window_run_print_results (HlWindow *self)
{
  self->skip_close_guard = TRUE;
  g_timeout_add_full (G_PRIORITY_DEFAULT_IDLE, HL_ANALYSIS_POLL_MS, print_results_idle_cb,
                      g_object_ref (self), g_object_unref);
}

/* ---- drag benchmark ------------------------------------------------- */

typedef struct {
  HlWindow *self;
  char *image_dir;       /* the generated radiograph, removed at the end */
  char *image_path;
  guint prepares_before;
  guint charts_before;
  GdkFrameClock *clock;
  gulong before_id;
  gulong after_id;
  gint64 paint_start_us;
  gint64 paint_start_cpu_us;
  /* Where a frame's time goes: the update (the drag's edit, the solve,
   * the views' own updates) and then layout, snapshot and render. */
  gulong update_id;
  gint64 update_end_us;
  gint64 update_end_cpu_us;
  GArray *update_ms;
  GArray *update_cpu_ms;
  GArray *draw_ms;
  GArray *draw_cpu_ms;
  guint base_reuses_before;
  gint64 last_frame_us;
  gint64 process_start_us;
  double startup_s;
  int frame;
  HlVec2 start;
  double lateral;        /* plan-frame x of one lateral mm */
  GArray *interval_ms;
  GArray *work_ms;
  GArray *cpu_ms;
  /* HIPLEVER_BENCHMARK_TEMPLATE=1 with a templated first option: the cup
   * template is dragged instead, with the ranking shown on the options
   * page. */
  gboolean template_drag;
  guint rankings_done;
} HlBench;

/* CPU time of this thread: less disturbed by other load than the clock. */
static gint64
thread_cpu_us (void)
{
  struct timespec ts;

  if (clock_gettime (CLOCK_THREAD_CPUTIME_ID, &ts) != 0)
    return 0;
  return (gint64) ts.tv_sec * G_USEC_PER_SEC + ts.tv_nsec / 1000;
}

static double
process_age_s (gint64 fallback_start_us)
{
  g_autofree char *stat = NULL;
  const char *p;
  struct timespec now;
  unsigned long long start_ticks = 0;
  long ticks = sysconf (_SC_CLK_TCK);

  /* Field 22 of /proc/self/stat, after the command name in brackets. */
  if (ticks > 0 && g_file_get_contents ("/proc/self/stat", &stat, NULL, NULL)
      && (p = strrchr (stat, ')')) != NULL
      && sscanf (p + 2, "%*c %*d %*d %*d %*d %*d %*u %*u %*u %*u %*u %*u %*u"
                        " %*d %*d %*d %*d %*d %*d %llu", &start_ticks) == 1
      && clock_gettime (CLOCK_BOOTTIME, &now) == 0)
    return (double) now.tv_sec + now.tv_nsec * 1e-9 - (double) start_ticks / (double) ticks;
  return (g_get_monotonic_time () - fallback_start_us) * 1e-6;
}

/* A "Key:   123 kB" line of /proc/self/status, in MB. */
static double
status_mb (const char *key)
{
  g_autofree char *status = NULL;
  const char *p;
  unsigned long kb = 0;

  if (!g_file_get_contents ("/proc/self/status", &status, NULL, NULL)
      || (p = strstr (status, key)) == NULL
      || sscanf (p + strlen (key), "%lu", &kb) != 1)
    return NAN;
  return kb / 1024.0;
}

static int
compare_double (gconstpointer a, gconstpointer b)
{
  double x = *(const double *) a, y = *(const double *) b;

  return (x > y) - (x < y);
}

static double
quantile (GArray *values, double q)
{
  g_autoptr(GArray) sorted = NULL;
  guint i;

  if (values->len == 0)
    return NAN;
  sorted = g_array_copy (values);
  g_array_sort (sorted, compare_double);
  i = (guint) lround (q * (sorted->len - 1));
  return g_array_index (sorted, double, i);
}

static void
bench_before_paint_cb (GdkFrameClock *clock, HlBench *bench)
{
  bench->paint_start_us = g_get_monotonic_time ();
  bench->paint_start_cpu_us = thread_cpu_us ();
}

/* Connected after the window's tick callback: the end of the update. */
static void
bench_update_cb (GdkFrameClock *clock, HlBench *bench)
{
  bench->update_end_us = g_get_monotonic_time ();
  bench->update_end_cpu_us = thread_cpu_us ();
}

static void
bench_after_paint_cb (GdkFrameClock *clock, HlBench *bench)
{
  gint64 now = g_get_monotonic_time (), now_cpu = thread_cpu_us ();
  double ms = (now - bench->paint_start_us) / 1000.0;
  double cpu = (now_cpu - bench->paint_start_cpu_us) / 1000.0;

  if (bench->startup_s == 0.0)
    bench->startup_s = process_age_s (bench->process_start_us);
  if (bench->frame > 0 && bench->frame <= HL_BENCH_FRAMES)
    {
      g_array_append_val (bench->work_ms, ms);
      g_array_append_val (bench->cpu_ms, cpu);
      if (bench->update_end_us >= bench->paint_start_us)
        {
          double v[4] = { (bench->update_end_us - bench->paint_start_us) / 1000.0,
                          (bench->update_end_cpu_us - bench->paint_start_cpu_us) / 1000.0,
                          (now - bench->update_end_us) / 1000.0,
                          (now_cpu - bench->update_end_cpu_us) / 1000.0 };

          g_array_append_val (bench->update_ms, v[0]);
          g_array_append_val (bench->update_cpu_ms, v[1]);
          g_array_append_val (bench->draw_ms, v[2]);
          g_array_append_val (bench->draw_cpu_ms, v[3]);
        }
    }
}

static void
bench_finish (HlBench *bench)
{
  HlWindow *self = bench->self;

  HlChartsView *charts = HL_CHARTS_VIEW (self->charts_view);

  printf ("benchmark-drag: %d frames, %zu options, %s moved %.1f mm laterally; "
          "charts shown with 5-95%% bands, a %d x %d radiograph under the schematic\n",
          HL_BENCH_FRAMES, hl_window_get_plan (self)->n_options,
          bench->template_drag ? "the cup template" : "abductor insertion",
          HL_BENCH_FRAMES * HL_BENCH_STEP_MM, HL_BENCH_IMAGE_W, HL_BENCH_IMAGE_H);
  if (bench->template_drag)
    {
      GtkWidget *panel = hl_options_page_get_template_panel (self->options_page);
      printf ("template ranking visible: %u rows; the last ranking took %.1f ms off the main thread\n",
              hl_template_panel_get_n_ranked (panel), hl_template_panel_get_rank_ms (panel));
    }
  printf ("model prepared %u times in %d frames; charts computed %u times off the main thread\n",
          hl_document_get_prepare_count (self->document) - bench->prepares_before,
          HL_BENCH_FRAMES, hl_charts_view_get_compute_count (charts) - bench->charts_before);
  printf ("frame interval: median %.2f ms, p95 %.2f ms\n",
          quantile (bench->interval_ms, 0.5), quantile (bench->interval_ms, HL_BENCH_P95));
  printf ("frame time (update, layout, snapshot, render): median %.2f ms, p95 %.2f ms (target median <= 4 ms, p95 <= 8 ms)\n",
          quantile (bench->work_ms, 0.5), quantile (bench->work_ms, HL_BENCH_P95));
  printf ("frame CPU time of the main thread: median %.2f ms, p95 %.2f ms\n",
          quantile (bench->cpu_ms, 0.5), quantile (bench->cpu_ms, HL_BENCH_P95));
  printf ("frame parts, median: update (edit, solve, views) %.2f ms, CPU %.2f ms; "
          "layout, snapshot and render %.2f ms, CPU %.2f ms; "
          "schematic's base layer reused in %u frames\n",
          quantile (bench->update_ms, 0.5), quantile (bench->update_cpu_ms, 0.5),
          quantile (bench->draw_ms, 0.5), quantile (bench->draw_cpu_ms, 0.5),
          hl_canvas_get_base_reuses (HL_CANVAS (self->canvas)) - bench->base_reuses_before);
  printf ("startup to first frame: %.3f s (target <= 0.5 s)\n", bench->startup_s);
  printf ("resident memory: %.1f MB (target <= 100 MB); of it %.1f MB mapped files (libraries, fonts), %.1f MB own\n",
          status_mb ("VmRSS:"), status_mb ("RssFile:"), status_mb ("RssAnon:"));
  fflush (stdout);

  g_signal_handler_disconnect (bench->clock, bench->before_id);
  g_signal_handler_disconnect (bench->clock, bench->after_id);
  g_signal_handler_disconnect (bench->clock, bench->update_id);
  g_array_unref (bench->update_ms);
  g_array_unref (bench->update_cpu_ms);
  g_array_unref (bench->draw_ms);
  g_array_unref (bench->draw_cpu_ms);
  g_array_unref (bench->interval_ms);
  g_array_unref (bench->work_ms);
  g_array_unref (bench->cpu_ms);
  if (bench->image_path != NULL)
    g_remove (bench->image_path);
  if (bench->image_dir != NULL)
    g_rmdir (bench->image_dir);
  g_free (bench->image_path);
  g_free (bench->image_dir);
  hl_window_write_dump (self);
  hl_application_finish (window_app (self), 0);
  g_free (bench);
}

static gboolean
bench_tick_cb (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  HlBench *bench = user_data;
  HlWindow *self = bench->self;
  gint64 t = gdk_frame_clock_get_frame_time (clock);
  const int id = HL_LM_ABDUCTOR_INSERTION;
  double x;

  if (bench->frame == 0)
    {
      bench->before_id = g_signal_connect (clock, "before-paint",
                                           G_CALLBACK (bench_before_paint_cb), bench);
      bench->after_id = g_signal_connect (clock, "after-paint",
                                          G_CALLBACK (bench_after_paint_cb), bench);
      bench->update_id = g_signal_connect (clock, "update",
                                           G_CALLBACK (bench_update_cb), bench);
      bench->base_reuses_before = hl_canvas_get_base_reuses (HL_CANVAS (self->canvas));
      bench->clock = clock;
      bench->start = hl_window_get_plan (self)->landmarks.p[id];
      bench->prepares_before = hl_document_get_prepare_count (self->document);
      bench->charts_before = hl_charts_view_get_compute_count (HL_CHARTS_VIEW (self->charts_view));
      if (bench->template_drag)
        {
          const HlTemplate *tm = &hl_window_get_plan (self)->options[0].recon.tmpl;
          bench->start = (HlVec2) { tm->cup_x_mm, tm->cup_y_mm };
          g_signal_emit_by_name (self->canvas, "template-drag-begin", HL_TEMPLATE_PART_CUP);
        }
      else
        g_signal_emit_by_name (self->canvas, "landmark-drag-begin", id);
    }
  else
    {
      double ms = (t - bench->last_frame_us) / 1000.0;

      g_array_append_val (bench->interval_ms, ms);
    }
  bench->last_frame_us = t;

  if (bench->frame == HL_BENCH_FRAMES)
    {
      if (bench->template_drag)
        g_signal_emit_by_name (self->canvas, "template-drag-end", HL_TEMPLATE_PART_CUP, FALSE);
      else
        g_signal_emit_by_name (self->canvas, "landmark-drag-end", id, FALSE);
      bench_finish (bench);
      return G_SOURCE_REMOVE;
    }
  bench->frame++;
  x = bench->start.x + bench->lateral * HL_BENCH_STEP_MM * bench->frame;
  if (bench->template_drag)
    g_signal_emit_by_name (self->canvas, "template-dragged", HL_TEMPLATE_PART_CUP,
                           bench->start.x, bench->start.y, x, bench->start.y);
  else
    g_signal_emit_by_name (self->canvas, "landmark-moved", id, x, bench->start.y);
  return G_SOURCE_CONTINUE;
}

/* A radiograph-sized image with fine detail everywhere, written as a PNG
 * and imported as the user would, so that the drag draws over a real
 * underlay. */
static char *
bench_write_image (char **dir_out)
{
  g_autoptr(GError) error = NULL;
  g_autofree char *dir = g_dir_make_tmp ("hiplever-bench-XXXXXX", &error);
  cairo_surface_t *s;
  unsigned char *data;
  int stride;
  char *path;

  if (dir == NULL)
    {
      g_printerr ("hiplever: no folder for the benchmark image: %s\n", error->message);
      return NULL;
    }
  s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, HL_BENCH_IMAGE_W, HL_BENCH_IMAGE_H);
  cairo_surface_flush (s);
  data = cairo_image_surface_get_data (s);
  stride = cairo_image_surface_get_stride (s);
  for (int y = 0; y < HL_BENCH_IMAGE_H; y++)
    {
      guint32 *row = (guint32 *) (data + (gsize) y * stride);

      for (int x = 0; x < HL_BENCH_IMAGE_W; x++)
        {
          guint v = (guint) ((x * 255) / HL_BENCH_IMAGE_W + ((x ^ y) & 31)) & 0xff;

          row[x] = (v << 16) | (v << 8) | v;
        }
    }
  cairo_surface_mark_dirty (s);
  path = g_build_filename (dir, "benchmark-radiograph.png", NULL);
  if (cairo_surface_write_to_png (s, path) != CAIRO_STATUS_SUCCESS)
    {
      g_printerr ("hiplever: could not write the benchmark image %s\n", path);
      g_clear_pointer (&path, g_free);
      g_rmdir (dir);
    }
  cairo_surface_destroy (s);
  *dir_out = path != NULL ? g_steal_pointer (&dir) : NULL;
  return path;
}

void
hl_window_run_benchmark_drag (HlWindow *self, gint64 process_start_us)
{
  HlBench *bench = g_new0 (HlBench, 1);

  self->skip_close_guard = TRUE;
  bench->image_path = bench_write_image (&bench->image_dir);
  if (bench->image_path != NULL)
    hl_radiograph_page_import (self->radiograph_page, bench->image_path);
  while (hl_window_get_plan (self)->n_options < HL_BENCH_OPTIONS)
    hl_window_add_option (self);
  if (hl_window_get_plan (self)->n_options > 0)
    hl_window_select_option (self, 0);
  bench->template_drag = g_strcmp0 (g_getenv ("HIPLEVER_BENCHMARK_TEMPLATE"), "1") == 0
                         && hl_window_get_plan (self)->n_options > 0
                         && hl_window_get_plan (self)->options[0].recon.tmpl.on;
  if (bench->template_drag)
    gtk_stack_set_visible_child_name (self->panel_stack, "options");
  hl_charts_view_set_show_bands (HL_CHARTS_VIEW (self->charts_view), TRUE);
  gtk_stack_set_visible_child_name (self->lower_stack, "charts");
  bench->self = self;
  bench->process_start_us = process_start_us;
  /* Lateral is towards -x for a right hip (plan x points to the left). */
  bench->lateral = hl_window_get_plan (self)->side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  bench->interval_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->work_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->cpu_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->update_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->update_cpu_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->draw_ms = g_array_new (FALSE, FALSE, sizeof (double));
  bench->draw_cpu_ms = g_array_new (FALSE, FALSE, sizeof (double));
  gtk_widget_add_tick_callback (GTK_WIDGET (self), bench_tick_cb, bench, NULL);
}

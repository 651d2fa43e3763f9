/* hl-radiograph-page.c: the "Radiograph" page of the side panel.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-radiograph-page"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-image.h"
#include "hl-measure.h"
#include "hl-radiograph-page.h"
#include "hl-ui-util.h"
#include "hl-underlay.h"
#include "hl-version.h"
#include "hl-message.h"
#include "hl-worker.h"

#define PAGE_KEY "hl-radiograph-page"
#define PAGE_NAME "radiograph"
#define MEASURE_DECIMALS 1
#define MAGNIFICATION_DECIMALS HL_DECIMALS_MAGNIFICATION
/* Differences to the other side beyond this are marked (common practice
 * for leg length; the same figure is used for the offsets as a prompt to
 * look, not a threshold of any source). */
#define DIFF_MARK_MM 5.0
/* Spin ranges of our own. */
#define DIAMETER_MAX_MM 100.0
#define DISTANCE_MAX_MM 1000.0
/* The benchmark: image size, frames, and the zoom and pan per frame. */
#define BENCH_SIDE 4000
#define BENCH_FRAMES 240
#define BENCH_ZOOM_STEP 1.01
#define BENCH_PAN_PX 6.0
#define BENCH_P95 0.95
/* Window adjustment: a right-button drag moves the window by this share
 * of the image's grey range per screen pixel (horizontal: width, vertical:
 * centre); Page Up and Page Down step the centre, with Shift the width,
 * by KEY_STEP of the range.  Our own choices. */
#define DRAG_RANGE_PER_PX (1.0 / 500.0)
#define KEY_STEP 0.02
#define PROGRESS_PULSE_MS 100

enum { METHOD_NONE, METHOD_MARKER, METHOD_TWO_POINT, METHOD_TYPED, N_METHODS };

struct _HlRadiographPage {
  GtkBox parent_instance;

  /* borrowed */
  HlDocument *document;
  HlCanvas *canvas;

  /* template widgets */
  GtkWidget *image_banner;
  GtkWidget *side_banner;
  GtkWidget *file_label;
  GtkWidget *import_button;
  GtkWidget *schematic_check;
  GtkWidget *centre_spin;
  GtkWidget *width_spin;
  GtkWidget *auto_button;
  GtkWidget *preset_button;
  GtkWidget *window_label;
  GtkWidget *progress;
  GtkWidget *burned_banner;
  GtkWidget *invert_check;
  GtkWidget *opacity_scale;
  GtkWidget *spacing_spin;
  GtkWidget *method_drop;
  GtkWidget *size_spin;
  GtkWidget *size_label;
  GtkWidget *calibrate_button;
  GtkWidget *calibrate_label;
  GtkWidget *magnification_label;
  GtkWidget *guide_button;
  GtkWidget *guide_box;
  GtkWidget *guide_label;
  GtkWidget *skip_button;
  GtkWidget *back_button;
  GtkWidget *stop_button;
  GtkWidget *measures_grid;
  GtkWidget *caution_label;
  size_t grid_cases;

  /* owned */
  HlUnderlay *underlay;
  char *loaded_path;         /* the reference the underlay was loaded for */
  GtkNativeDialog *chooser;
  GCancellable *load_cancel;

  /* loading off the main thread: a result is used only when its
   * generation is still the page's */
  guint load_generation;
  gboolean loading;
  gboolean disposed;
  guint pulse_id;
  /* a right-button drag: the window where it began */
  double drag_centre, drag_width;

  /* state */
  guint syncing;
  gboolean stale;      /* edited while hidden: update when shown */
  gboolean calibrating;
  int n_cal_points;
  HlVec2 cal_points[3];      /* image mm */
  gboolean guiding;
  int guide_index;           /* HlLandmarkId asked for; kept when stopped */
  gboolean benchmark;
  int test_answer;          /* test hook: 0 ask, 1 keep, 2 clear on a new import */
};

G_DEFINE_FINAL_TYPE (HlRadiographPage, hl_radiograph_page, GTK_TYPE_BOX)

/* The document's plan: written only between hl_document_begin_edit and
 * hl_document_end_edit. */
static HlPlan *
plan_of (HlRadiographPage *self)
{
  return (HlPlan *) hl_document_get_plan (self->document);
}

static void refresh (HlRadiographPage *self);

static int
method_index (HlCalMethod m)
{
  switch (m)
    {
    case HL_CAL_MARKER:
      return METHOD_MARKER;
    case HL_CAL_TWO_POINT:
      return METHOD_TWO_POINT;
    case HL_CAL_TYPED:
      return METHOD_TYPED;
    case HL_CAL_ASSUMED:
    default:
      return METHOD_NONE;
    }
}

static HlCalMethod
method_of_index (guint i)
{
  static const HlCalMethod m[N_METHODS] = { HL_CAL_ASSUMED, HL_CAL_MARKER, HL_CAL_TWO_POINT,
                                            HL_CAL_TYPED };
  return i < N_METHODS ? m[i] : HL_CAL_ASSUMED;
}

static int
points_needed (HlCalMethod m)
{
  return m == HL_CAL_MARKER ? 3 : m == HL_CAL_TWO_POINT ? 2 : 0;
}

static void
set_banner (GtkWidget *banner, const char *text)
{
  gtk_widget_set_visible (banner, text != NULL);
  if (text != NULL)
    gtk_label_set_text (GTK_LABEL (banner), text);
}

/* ---- Loading the image ----------------------------------------------------- */

static void
drop_underlay (HlRadiographPage *self)
{
  hl_canvas_set_underlay (self->canvas, NULL);
  g_clear_pointer (&self->underlay, hl_underlay_free);
}

/* ---- Reading off the main thread ------------------------------------------ */

typedef struct {
  char *path;
  guint generation;
  gboolean import;          /* a new import, else the plan's own image */
  char expected_sha[65];    /* the plan's digest, or "" */
  /* results */
  HlUnderlay *underlay;
  HlError err;
  char hex[65];
  gboolean hashed;
} LoadJob;

static void
load_job_free (LoadJob *job)
{
  g_free (job->path);
  hl_underlay_free (job->underlay);
  g_free (job);
}

/* The worker: decode (size checks first), then the digest. */
static void
load_thread (GTask *task, gpointer source, gpointer data, GCancellable *cancel)
{
  LoadJob *job = data;

  hl_worker_lower_priority ();
  hl_error_clear (&job->err);
  job->underlay = hl_underlay_new_from_file (job->path, &job->err);
  if (job->underlay != NULL && !g_cancellable_is_cancelled (cancel))
    job->hashed = hl_file_sha256_hex (job->path, job->hex, &job->err) == HL_OK;
  g_task_return_boolean (task, TRUE);
}

static gboolean
pulse_cb (gpointer data)
{
  HlRadiographPage *self = data;
  gtk_progress_bar_pulse (GTK_PROGRESS_BAR (self->progress));
  return G_SOURCE_CONTINUE;
}

static void
set_loading (HlRadiographPage *self, gboolean on)
{
  self->loading = on;
  gtk_widget_set_visible (self->progress, on);
  gtk_widget_set_sensitive (self->import_button, !on);
  if (on && self->pulse_id == 0)
    self->pulse_id = g_timeout_add (PROGRESS_PULSE_MS, pulse_cb, self);
  else if (!on && self->pulse_id != 0)
    {
      g_source_remove (self->pulse_id);
      self->pulse_id = 0;
    }
}

static void load_done_cb (GObject *source, GAsyncResult *res, gpointer data);

static void
start_load (HlRadiographPage *self, const char *path, gboolean import, const char *sha)
{
  if (self->load_cancel != NULL)
    g_cancellable_cancel (self->load_cancel);
  g_clear_object (&self->load_cancel);
  self->load_cancel = g_cancellable_new ();
  LoadJob *job = g_new0 (LoadJob, 1);
  job->path = g_strdup (path);
  job->generation = ++self->load_generation;
  job->import = import;
  snprintf (job->expected_sha, sizeof job->expected_sha, "%s", sha != NULL ? sha : "");
  g_autofree char *base = g_path_get_basename (path);
  g_autofree char *text = g_strdup_printf (_("Reading the image %s…"), base);
  gtk_progress_bar_set_text (GTK_PROGRESS_BAR (self->progress), text);
  set_loading (self, TRUE);
  GTask *task = g_task_new (NULL, self->load_cancel, load_done_cb, g_object_ref (self));
  g_task_set_task_data (task, job, (GDestroyNotify) load_job_free);
  g_task_run_in_thread (task, load_thread);
  g_object_unref (task);
}

/* Loads the plan's image when its reference changed (off the main
 * thread); the plan goes on without it until then, and without it when it
 * cannot be used, with a banner saying why. */
static void
sync_underlay (HlRadiographPage *self)
{
  const HlRadiograph *rg = &plan_of (self)->radiograph;
  if (self->benchmark)
    return;
  if (!rg->present)
    {
      if (self->loaded_path != NULL || self->underlay != NULL)
        self->load_generation++;       /* a pending load is for another plan */
      drop_underlay (self);
      g_clear_pointer (&self->loaded_path, g_free);
      set_banner (self->image_banner, NULL);
      set_loading (self, FALSE);
      return;
    }
  if (g_strcmp0 (self->loaded_path, rg->path) == 0)
    return;
  g_free (self->loaded_path);
  self->loaded_path = g_strdup (rg->path);
  drop_underlay (self);
  set_banner (self->image_banner, NULL);
  start_load (self, rg->path, FALSE, rg->sha256);
}

/* Attaches a decoded image to the plan as one undoable edit.  `clear`:
 * the landmarks go back to the defaults of a new plan and the calibration
 * of the old image is dropped. */
static void
import_apply (HlRadiographPage *self, const char *path, const char *hex,
              HlUnderlay *underlay, gboolean clear)
{
  if (hl_document_begin_edit (self->document, NULL) == NULL)
    {
      hl_underlay_free (underlay);
      return;
    }
  HlPlan *plan = plan_of (self);
  if (clear)
    {
      HlPlan *fresh = hl_plan_new ();
      if (fresh != NULL)
        {
          hl_plan_set_demo_landmarks (fresh);
          plan->landmarks = fresh->landmarks;
          plan->calibration = fresh->calibration;
          hl_plan_free (fresh);
        }
    }
  const HlGrayImage *img = hl_underlay_get_image (underlay);
  HlSpacingChoice sc;
  if (hl_spacing_choose (&img->spacing, &sc, NULL) != HL_OK)
    sc.source = HL_SPACING_NONE;   /* checked by the reader: cannot happen */
  double typed = plan->radiograph.present ? plan->radiograph.pixel_spacing_mm
                                          : HL_PIXEL_SPACING_DEFAULT_MM;
  g_autofree char *abs = g_canonicalize_filename (path, NULL);
  hl_image_attach_file (plan, abs, hex, &sc, typed, hl_underlay_get_width (underlay),
                        hl_underlay_get_height (underlay));
  drop_underlay (self);
  self->underlay = underlay;
  g_free (self->loaded_path);
  self->loaded_path = g_strdup (plan->radiograph.path);
  hl_canvas_set_underlay (self->canvas, self->underlay);
  set_banner (self->image_banner, NULL);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

/* An image waiting for the answer to "keep or clear?". */
typedef struct {
  HlRadiographPage *self;   /* a reference */
  char *path;
  char hex[65];
  HlUnderlay *underlay;
} PendingImport;

static void
replace_response_cb (GtkDialog *dialog, int response, PendingImport *p)
{
  gtk_window_destroy (GTK_WINDOW (dialog));
  if ((response == GTK_RESPONSE_ACCEPT || response == GTK_RESPONSE_REJECT)
      && !p->self->disposed)
    import_apply (p->self, p->path, p->hex, g_steal_pointer (&p->underlay),
                  response == GTK_RESPONSE_REJECT);
  hl_underlay_free (p->underlay);
  g_free (p->path);
  g_object_unref (p->self);
  g_free (p);
}

static void
import_done (HlRadiographPage *self, LoadJob *job)
{
  if (job->underlay == NULL || !job->hashed)
    {
      g_autofree char *msg = hl_document_format_error (&job->err);
      hl_message_show_error (GTK_WIDGET (self), _("Could not import the image"), msg);
      return;
    }
  /* A new image over an old one: the landmarks and the calibration were
   * placed on the old image, so keeping them is a choice, never silent. */
  if (!plan_of (self)->radiograph.present || self->test_answer != 0)
    {
      import_apply (self, job->path, job->hex, g_steal_pointer (&job->underlay),
                    self->test_answer == 2);
      self->test_answer = 0;   /* the hook's answer holds for its own import only */
      return;
    }
  PendingImport *p = g_new0 (PendingImport, 1);
  p->self = g_object_ref (self);
  p->path = g_strdup (job->path);
  g_strlcpy (p->hex, job->hex, sizeof p->hex);
  p->underlay = g_steal_pointer (&job->underlay);
  GtkRoot *root = gtk_widget_get_root (GTK_WIDGET (self));
  GtkWidget *dialog = gtk_message_dialog_new (GTK_IS_WINDOW (root) ? GTK_WINDOW (root) : NULL,
                                              GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                              GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE, "%s",
                                              _("Keep the landmarks and the calibration of the "
                                                "previous radiograph?"));
  gtk_message_dialog_format_secondary_text (
    GTK_MESSAGE_DIALOG (dialog), "%s",
    _("They were placed on the previous image; the new one may show the hip at another "
      "place and scale. Clear puts the landmarks back to the defaults of a new plan and "
      "removes the calibration; Keep leaves both to be checked on the new image."));
  gtk_dialog_add_buttons (GTK_DIALOG (dialog), _("_Cancel"), GTK_RESPONSE_CANCEL,
                          _("C_lear"), GTK_RESPONSE_REJECT, _("_Keep"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_CANCEL);
  gtk_window_set_title (GTK_WINDOW (dialog), _("A new radiograph"));
  g_signal_connect (dialog, "response", G_CALLBACK (replace_response_cb), p);
  gtk_window_present (GTK_WINDOW (dialog));
}

static void
open_done (HlRadiographPage *self, LoadJob *job)
{
  if (job->underlay == NULL)
    {
      g_autofree char *text = job->err.status == HL_ERR_IO
        ? g_strdup_printf (_("%s. The plan is shown without it; import the image again to "
                             "see it."), job->err.message)
        : g_strdup_printf (_("%s The plan is shown without it."), job->err.message);
      set_banner (self->image_banner, text);
      g_printerr ("hiplever: %s\n", job->err.message);
      hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
      return;
    }
  if (!job->hashed
      || (job->expected_sha[0] != '\0' && strcmp (job->hex, job->expected_sha) != 0))
    {
      g_autofree char *base = g_path_get_basename (job->path);
      g_autofree char *text = g_strdup_printf (
        _("The radiograph %s has changed since the plan was saved. Check that it is this "
          "patient's image before relying on the landmarks."), base);
      set_banner (self->image_banner, text);
      g_printerr ("hiplever: %s\n", text);
    }
  self->underlay = g_steal_pointer (&job->underlay);
  hl_canvas_set_underlay (self->canvas, self->underlay);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

static void
load_done_cb (GObject *source, GAsyncResult *res, gpointer data)
{
  HlRadiographPage *self = data;
  LoadJob *job = g_task_get_task_data (G_TASK (res));
  if (job->generation == self->load_generation && !self->disposed)
    {
      set_loading (self, FALSE);
      if (job->import)
        import_done (self, job);
      else
        open_done (self, job);
    }
  g_object_unref (self);
}

static void
import_file (HlRadiographPage *self, const char *path)
{
  start_load (self, path, TRUE, NULL);
}

void
hl_radiograph_page_import (HlRadiographPage *self, const char *path)
{
  g_return_if_fail (HL_IS_RADIOGRAPH_PAGE (self));
  import_file (self, path);
}

static void
chooser_response_cb (GtkNativeDialog *dialog, int response, HlRadiographPage *self)
{
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (dialog));
      g_autofree char *path = file != NULL ? g_file_get_path (file) : NULL;
      if (path != NULL)
        import_file (self, path);
    }
  gtk_native_dialog_destroy (dialog);
  g_clear_object (&self->chooser);
}

static void
import_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  if (self->chooser != NULL)
    return;
  GtkFileChooserNative *chooser =
    gtk_file_chooser_native_new (_("Import a radiograph"), GTK_WINDOW (gtk_widget_get_root (GTK_WIDGET (self))),
                                 GTK_FILE_CHOOSER_ACTION_OPEN, _("_Import"), _("_Cancel"));
  static const struct { const char *name; const char *patterns[3]; } filters[] = {
    { N_("All files (images are recognised by their content)"), { "*", NULL, NULL } },
    { N_("DICOM files"), { "*.dcm", "*.DCM", "*.dicom" } },
    { N_("PNG images"), { "*.png", NULL, NULL } },
    { N_("JPEG images"), { "*.jpg", "*.jpeg", NULL } },
    { N_("TIFF images"), { "*.tif", "*.tiff", NULL } },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (filters); i++)
    {
      g_autoptr (GtkFileFilter) f = gtk_file_filter_new ();
      gtk_file_filter_set_name (f, _(filters[i].name));
      for (int k = 0; k < 3 && filters[i].patterns[k] != NULL; k++)
        gtk_file_filter_add_pattern (f, filters[i].patterns[k]);
      gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), f);
    }
  self->chooser = GTK_NATIVE_DIALOG (chooser);
  g_signal_connect_object (chooser, "response", G_CALLBACK (chooser_response_cb), self, 0);
  gtk_native_dialog_show (self->chooser);
}

/* ---- Display and spacing --------------------------------------------------- */

static gboolean
edit (HlRadiographPage *self, const char *field)
{
  return self->syncing == 0 && plan_of (self)->radiograph.present
         && (hl_document_begin_edit (self->document, field) != NULL);
}

static void
scale_changed_cb (GtkRange *range, HlRadiographPage *self)
{
  if (!edit (self, "radiograph-opacity"))
    return;
  HlRadiograph *rg = &plan_of (self)->radiograph;
  double v = gtk_range_get_value (range);
  rg->opacity = v;
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

static void
toggle_cb (GtkCheckButton *check, HlRadiographPage *self)
{
  if (!edit (self, NULL))
    return;
  HlRadiograph *rg = &plan_of (self)->radiograph;
  gboolean on = gtk_check_button_get_active (check);
  if (GTK_WIDGET (check) == self->invert_check)
    rg->invert = on;
  else
    rg->schematic_visible = on;
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

/* The grey range of the image: 0 .. 2^bits - 1 (65535 without one). */
static double
grey_top (HlRadiographPage *self)
{
  const HlGrayImage *img = self->underlay != NULL ? hl_underlay_get_image (self->underlay) : NULL;
  int bits = img != NULL && img->bits > 0 && img->bits <= 16 ? img->bits : 16;
  if (img != NULL && img->value_scale != 1.0)
    bits = 16;   /* rescaled onto the whole 16-bit range */
  return (double) ((1u << bits) - 1u);
}

/* The window shown: the plan's; else what brightness and contrast of an
 * older plan showed; else the image's own preset or the automatic one
 * (the core's rule, which the exports follow too). */
static void
effective_window (HlRadiographPage *self, double *centre, double *width)
{
  const HlRadiograph *rg = &plan_of (self)->radiograph;

  if (self->underlay != NULL)
    {
      /* The image's own window as worked out once: the automatic one is a
       * histogram of every pixel, too slow for every frame of a drag. */
      double image_centre, image_width;

      hl_underlay_get_default_window (self->underlay, &image_centre, &image_width);
      hl_radiograph_display_window_known (rg, hl_underlay_get_image (self->underlay),
                                          image_centre, image_width, centre, width);
    }
  else
    hl_radiograph_display_window (rg, NULL, centre, width);
}

static void
set_window (HlRadiographPage *self, double centre, double width)
{
  if (!edit (self, "radiograph-window"))
    return;
  HlRadiograph *rg = &plan_of (self)->radiograph;
  rg->window_width = CLAMP (width, HL_IMAGE_WINDOW_WIDTH_MIN, HL_IMAGE_WINDOW_WIDTH_MAX);
  rg->window_centre = CLAMP (centre, HL_IMAGE_WINDOW_CENTRE_MIN, HL_IMAGE_WINDOW_CENTRE_MAX);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

static void
window_spin_cb (GtkSpinButton *spin, HlRadiographPage *self)
{
  if (self->syncing > 0)
    return;
  set_window (self, gtk_spin_button_get_value (GTK_SPIN_BUTTON (self->centre_spin)),
              gtk_spin_button_get_value (GTK_SPIN_BUTTON (self->width_spin)));
}

static void
auto_window_cb (GtkButton *button, HlRadiographPage *self)
{
  if (self->underlay == NULL)
    return;
  double c, w;
  hl_gray_image_auto_window (hl_underlay_get_image (self->underlay), &c, &w);
  set_window (self, c, w);
}

static void
preset_window_cb (GtkButton *button, HlRadiographPage *self)
{
  const HlGrayImage *img = self->underlay != NULL ? hl_underlay_get_image (self->underlay) : NULL;
  if (img == NULL || !img->has_file_window)
    return;
  set_window (self, img->file_window_centre, img->file_window_width);
}

static void
window_drag_begin_cb (GtkGestureDrag *gesture, double x, double y, HlRadiographPage *self)
{

  if (self->underlay == NULL || !plan_of (self)->radiograph.present)
    {
      gtk_gesture_set_state (GTK_GESTURE (gesture), GTK_EVENT_SEQUENCE_DENIED);
      return;
    }
  gtk_gesture_set_state (GTK_GESTURE (gesture), GTK_EVENT_SEQUENCE_CLAIMED);
  effective_window (self, &self->drag_centre, &self->drag_width);
}

static void
window_drag_update_cb (GtkGestureDrag *gesture, double dx, double dy, HlRadiographPage *self)
{
  double k = grey_top (self) * DRAG_RANGE_PER_PX;
  set_window (self, self->drag_centre + dy * k, self->drag_width + dx * k);
}

static gboolean
window_key_cb (GtkEventControllerKey *controller, guint keyval, guint keycode,
               GdkModifierType state, HlRadiographPage *self)
{
  if (keyval != GDK_KEY_Page_Up && keyval != GDK_KEY_Page_Down
      && keyval != GDK_KEY_KP_Page_Up && keyval != GDK_KEY_KP_Page_Down)
    return FALSE;
  if (self->underlay == NULL || !plan_of (self)->radiograph.present
      || (state & (GDK_CONTROL_MASK | GDK_ALT_MASK)) != 0)
    return FALSE;
  double c, w, step = KEY_STEP * grey_top (self);
  effective_window (self, &c, &w);
  int dir = keyval == GDK_KEY_Page_Up || keyval == GDK_KEY_KP_Page_Up ? 1 : -1;
  if (state & GDK_SHIFT_MASK)
    set_window (self, c, w + dir * step);      /* Shift: wider or narrower */
  else
    set_window (self, c - dir * step, w);      /* brighter or darker */
  return TRUE;
}

static void
spacing_changed_cb (GtkSpinButton *spin, HlRadiographPage *self)
{
  if (!edit (self, "radiograph-spacing"))
    return;
  HlError err;
  hl_error_clear (&err);
  plan_of (self)->radiograph.spacing_source = HL_SPACING_NONE;
  if (hl_image_set_pixel_spacing (plan_of (self), gtk_spin_button_get_value (spin), &err)
      != HL_OK)
    {
      g_autofree char *msg = hl_document_format_error (&err);
      hl_message_show_error (GTK_WIDGET (self), _("The pixel spacing was not changed"), msg);
    }
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

/* ---- Calibration ------------------------------------------------------------ */

static void
set_click_mode (HlRadiographPage *self)
{
  hl_canvas_set_click_placement (self->canvas, self->calibrating || self->guiding);
}

static void
stop_calibrating (HlRadiographPage *self)
{
  self->calibrating = FALSE;
  self->n_cal_points = 0;
  set_click_mode (self);
}

/* Replaces the calibration (one undo step); landmarks keep their pixels. */
static void
apply_calibration (HlRadiographPage *self, const HlCalibration *cal, const char *field)
{
  HlError err;
  hl_error_clear (&err);
  /* A calibration that gives a magnification outside 1.0-1.5 (a marker
   * diameter typed so that the placed points make 1.58) is refused with
   * the magnification named, as the loader and the writer refuse it. */
  if ((hl_calibration_complete (cal) || cal->method == HL_CAL_TYPED)
      && hl_calibration_magnification (cal, NULL, NULL, &err) != HL_OK)
    {
      g_autofree char *msg = hl_document_format_error (&err);
      hl_message_show_error (GTK_WIDGET (self), _("The calibration was not changed"), msg);
      refresh (self);
      return;
    }
  if (!(hl_document_begin_edit (self->document, field) != NULL))
    return;
  HlPlan *plan = plan_of (self);
  /* A marker still without its points gives no magnification yet: it is
   * recorded as chosen and the assumed 1.20 stands until it is placed. */
  if (hl_image_apply_calibration (plan, cal, &err) != HL_OK)
    plan->calibration = *cal;
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

static void
method_changed_cb (GtkDropDown *drop, GParamSpec *pspec, HlRadiographPage *self)
{
  if (self->syncing > 0)
    return;
  stop_calibrating (self);
  HlCalibration cal = plan_of (self)->calibration;
  cal.method = method_of_index (gtk_drop_down_get_selected (drop));
  /* Points kept from before that give no magnification for the new
   * method are dropped: it is chosen, and placed again. */
  if (cal.n_points < points_needed (cal.method)
      || (hl_calibration_complete (&cal)
          && hl_calibration_magnification (&cal, NULL, NULL, NULL) != HL_OK))
    cal.n_points = 0;
  apply_calibration (self, &cal, NULL);
}

static void
size_changed_cb (GtkSpinButton *spin, HlRadiographPage *self)
{
  if (self->syncing > 0)
    return;
  HlCalibration cal = plan_of (self)->calibration;
  double v = gtk_spin_button_get_value (spin);
  if (cal.method == HL_CAL_MARKER)
    cal.marker_diameter_mm = v;
  else if (cal.method == HL_CAL_TWO_POINT)
    cal.known_distance_mm = v;
  else if (cal.method == HL_CAL_TYPED)
    cal.magnification = v;
  else
    return;
  apply_calibration (self, &cal, "calibration-size");
}

static void
calibrate_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  HlCalMethod m = plan_of (self)->calibration.method;
  if (self->calibrating || points_needed (m) == 0)
    {
      stop_calibrating (self);
      refresh (self);
      return;
    }
  self->guiding = FALSE;
  self->calibrating = TRUE;
  self->n_cal_points = 0;
  set_click_mode (self);
  refresh (self);
}

static void
calibration_click (HlRadiographPage *self, double x, double y)
{
  HlPlan *plan = plan_of (self);
  double m = hl_image_display_magnification (plan, NULL);
  int need = points_needed (plan->calibration.method);
  self->cal_points[self->n_cal_points++] =
    hl_image_plan_to_image_mm (&plan->radiograph, m, (HlVec2) { x, y });
  if (self->n_cal_points < need)
    {
      refresh (self);
      return;
    }
  HlCalibration cal = plan->calibration;
  cal.n_points = need;
  memcpy (cal.points, self->cal_points, sizeof cal.points);
  stop_calibrating (self);
  HlError err;
  hl_error_clear (&err);
  if (hl_calibration_magnification (&cal, NULL, NULL, &err) != HL_OK)
    {
      g_autofree char *msg = hl_document_format_error (&err);
      hl_message_show_error (GTK_WIDGET (self), _("The calibration was not changed"), msg);
      refresh (self);
      return;
    }
  apply_calibration (self, &cal, NULL);
}

/* ---- Guided placement ------------------------------------------------------- */

static void
guide_show (HlRadiographPage *self)
{
  gtk_widget_set_visible (self->guide_box, self->guiding);
  gtk_button_set_label (GTK_BUTTON (self->guide_button),
                        self->guide_index > 0 && self->guide_index < HL_LM_COUNT
                        ? _("Resume placing landmarks") : _("Place landmarks step by step"));
  if (!self->guiding)
    return;
  const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) self->guide_index);
  g_autofree char *text =
    g_strdup_printf (_("Step %d of %d. Click on the image: %s (%s).\n%s"),
                     self->guide_index + 1, HL_LM_COUNT, _(info->label),
                     info->required ? _("required") : _("optional"), _(info->hint));
  gtk_label_set_text (GTK_LABEL (self->guide_label), text);
  gtk_widget_set_sensitive (self->back_button, self->guide_index > 0);
  hl_canvas_set_selected_landmark (self->canvas, self->guide_index);
}

static void
guide_stop (HlRadiographPage *self)
{
  self->guiding = FALSE;
  set_click_mode (self);
  guide_show (self);
}

static void
guide_advance (HlRadiographPage *self, int step)
{
  self->guide_index += step;
  if (self->guide_index < 0)
    self->guide_index = 0;
  if (self->guide_index >= HL_LM_COUNT)
    {
      self->guide_index = 0;
      guide_stop (self);
      return;
    }
  guide_show (self);
}

static void
guide_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  stop_calibrating (self);
  self->guiding = TRUE;
  set_click_mode (self);
  guide_show (self);
}

static void
skip_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  guide_advance (self, 1);
}

static void
back_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  guide_advance (self, -1);
}

static void
stop_clicked_cb (GtkButton *button, HlRadiographPage *self)
{
  guide_stop (self);
}

static void
guide_click (HlRadiographPage *self, double x, double y)
{
  HlLandmarkId id = (HlLandmarkId) self->guide_index;
  hl_document_break_coalescing (self->document);
  if (!(hl_document_begin_edit (self->document, NULL) != NULL))
    return;
  hl_landmarks_set (&plan_of (self)->landmarks, id, x, y);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
  guide_advance (self, 1);
}

static void
plan_clicked_cb (HlCanvas *canvas, double x, double y, HlRadiographPage *self)
{
  if (self->calibrating)
    calibration_click (self, x, y);
  else if (self->guiding)
    guide_click (self, x, y);
}

/* ---- Measures ------------------------------------------------------------------ */

static GtkWidget *
grid_label (const char *text, gboolean heading)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), heading ? 0.0f : 1.0f);
  gtk_widget_add_css_class (l, heading ? "heading" : "numeric");
  return l;
}

typedef struct {
  const char *label;  /* N_() */
  size_t offset;
  size_t diff_offset;
} MeasureRow;

static const MeasureRow measure_rows[] = {
  { N_("Acetabular offset (mm)"), G_STRUCT_OFFSET (HlSideMeasures, acetabular_offset_mm),
    G_STRUCT_OFFSET (HlMeasures, acetabular_offset_difference_mm) },
  { N_("Femoral offset (mm)"), G_STRUCT_OFFSET (HlSideMeasures, femoral_offset_mm),
    G_STRUCT_OFFSET (HlMeasures, femoral_offset_difference_mm) },
  { N_("Global offset (mm)"), G_STRUCT_OFFSET (HlSideMeasures, global_offset_mm),
    G_STRUCT_OFFSET (HlMeasures, global_offset_difference_mm) },
  { N_("Hip centre height (mm)"), G_STRUCT_OFFSET (HlSideMeasures, hip_centre_height_mm),
    G_STRUCT_OFFSET (HlMeasures, hip_centre_height_difference_mm) },
  { N_("Leg length (mm)"), G_STRUCT_OFFSET (HlSideMeasures, leg_length_mm),
    G_STRUCT_OFFSET (HlMeasures, leg_length_difference_mm) },
};

static char *
format_mm (double v, gboolean signed_value)
{
  if (!isfinite (v))
    return g_strdup ("—");
  return g_strdup_printf (signed_value ? "%+.*f" : "%.*f", MEASURE_DECIMALS, v);
}

/* Rows: each measure for the operated side and, below it, its difference
 * to the other side, the target (marked beyond DIFF_MARK_MM); columns:
 * native, each option, the other side. */
static void
sync_measures (HlRadiographPage *self, gboolean *contradiction)
{
  HlPlan *plan = plan_of (self);
  size_t n_cases = 1 + plan->n_options;
  GtkGrid *grid = GTK_GRID (self->measures_grid);
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (self->measures_grid)) != NULL)
    gtk_grid_remove (grid, child);

  gtk_grid_attach (grid, grid_label ("", TRUE), 0, 0, 1, 1);
  for (size_t i = 0; i < n_cases; i++)
    gtk_grid_attach (grid, grid_label (i == 0 ? _("Native") : plan->options[i - 1].name, TRUE),
                     1 + (int) i, 0, 1, 1);
  gtk_grid_attach (grid, grid_label (_("Other side"), TRUE), 1 + (int) n_cases, 0, 1, 1);

  *contradiction = FALSE;
  for (size_t i = 0; i < n_cases; i++)
    {
      HlMeasures ms;
      hl_row_measures (plan, i, &ms);
      if (i == 0)
        *contradiction = ms.side_contradiction;
      for (size_t r = 0; r < G_N_ELEMENTS (measure_rows); r++)
        {
          int row = 1 + 2 * (int) r;
          double v = G_STRUCT_MEMBER (double, &ms.operated, measure_rows[r].offset);
          double d = G_STRUCT_MEMBER (double, &ms, measure_rows[r].diff_offset);
          if (i == 0)
            {
              gtk_grid_attach (grid, grid_label (_(measure_rows[r].label), TRUE), 0, row, 1, 1);
              GtkWidget *dl = grid_label (_("  difference to the other side"), TRUE);
              gtk_widget_add_css_class (dl, "dim-label");
              gtk_grid_attach (grid, dl, 0, row + 1, 1, 1);
              g_autofree char *o = format_mm (G_STRUCT_MEMBER (double, &ms.other,
                                                               measure_rows[r].offset), FALSE);
              gtk_grid_attach (grid, grid_label (o, FALSE), 1 + (int) n_cases, row, 1, 1);
            }
          g_autofree char *vt = format_mm (v, FALSE);
          g_autofree char *dt = format_mm (d, TRUE);
          gtk_grid_attach (grid, grid_label (vt, FALSE), 1 + (int) i, row, 1, 1);
          GtkWidget *dw = grid_label (dt, FALSE);
          gtk_widget_add_css_class (dw, isfinite (d) && fabs (d) > DIFF_MARK_MM ? "warning"
                                                                                : "accent");
          gtk_grid_attach (grid, dw, 1 + (int) i, row + 1, 1, 1);
        }
    }
}

/* ---- Refreshing ------------------------------------------------------------------ */

static void
refresh (HlRadiographPage *self)
{
  HlPlan *plan = plan_of (self);
  const HlRadiograph *rg = &plan->radiograph;
  self->syncing++;

  sync_underlay (self);
  double wc = 0.0, ww = 1.0;
  if (self->underlay != NULL)
    {
      effective_window (self, &wc, &ww);
      hl_underlay_set_window (self->underlay, wc, ww, rg->invert);
    }
  hl_canvas_set_schematic_visible (self->canvas, !rg->present || rg->schematic_visible);

  /* The page's own controls and measures wait until it is shown: updating
   * them on every frame of a drag cost more than drawing the frame. */
  self->stale = !gtk_widget_get_mapped (GTK_WIDGET (self));
  if (self->stale)
    {
      self->syncing--;
      return;
    }

  g_autofree char *base = rg->present ? g_path_get_basename (rg->path) : NULL;
  g_autofree char *file_text = rg->present
    ? g_strdup_printf (_("Image: %s"), base)
    : g_strdup (_("No radiograph: the schematic alone. Image files should be "
                  "anonymised before import."));
  const HlGrayImage *img = self->underlay != NULL ? hl_underlay_get_image (self->underlay) : NULL;
  if (img != NULL)
    {
      g_autofree char *more = g_strdup_printf (
        _("%s (%s, %d x %d pixels, %d bits, %s). %s"), file_text,
        hl_image_format_name (img->format), img->width, img->height, img->bits,
        img->photometric, img->note);
      gtk_label_set_text (GTK_LABEL (self->file_label), more);
    }
  else
    gtk_label_set_text (GTK_LABEL (self->file_label), file_text);
  set_banner (self->burned_banner, img != NULL && img->burned_in_annotation
              ? _("Warning: the file says text is burned into its pixels (Burned In "
                  "Annotation): the image may show patient identifiers. Anything that shows "
                  "the image (this window, screenshots, exports that include it) will show "
                  "them too.")
              : NULL);
  gtk_widget_set_sensitive (self->schematic_check, rg->present);
  gtk_widget_set_sensitive (self->centre_spin, img != NULL);
  gtk_widget_set_sensitive (self->width_spin, img != NULL);
  gtk_widget_set_sensitive (self->auto_button, img != NULL);
  gtk_widget_set_sensitive (self->preset_button, img != NULL && img->has_file_window);
  gtk_widget_set_sensitive (self->invert_check, rg->present);
  gtk_widget_set_sensitive (self->opacity_scale, rg->present);
  gtk_widget_set_sensitive (self->spacing_spin, rg->present);
  gtk_widget_set_sensitive (self->guide_button, rg->present);
  /* Without an image the (insensitive) controls show what an import
   * starts with. */
  HlRadiograph defaults;
  hl_radiograph_init (&defaults);
  const HlRadiograph *shown = rg->present ? rg : &defaults;
  gtk_check_button_set_active (GTK_CHECK_BUTTON (self->schematic_check), shown->schematic_visible);
  gtk_spin_button_set_value (GTK_SPIN_BUTTON (self->centre_spin), wc);
  gtk_spin_button_set_value (GTK_SPIN_BUTTON (self->width_spin), ww);
  gtk_check_button_set_active (GTK_CHECK_BUTTON (self->invert_check), shown->invert);
  gtk_range_set_value (GTK_RANGE (self->opacity_scale), shown->opacity);
  gtk_spin_button_set_value (GTK_SPIN_BUTTON (self->spacing_spin), shown->pixel_spacing_mm);

  const HlCalibration *cal = &plan->calibration;
  gtk_drop_down_set_selected (GTK_DROP_DOWN (self->method_drop), method_index (cal->method));
  GtkSpinButton *size = GTK_SPIN_BUTTON (self->size_spin);
  gtk_widget_set_visible (self->size_spin, cal->method != HL_CAL_ASSUMED);
  gtk_widget_set_visible (self->size_label, cal->method != HL_CAL_ASSUMED);
  if (cal->method == HL_CAL_MARKER)
    {
      gtk_label_set_text (GTK_LABEL (self->size_label), _("Marker diameter (mm)"));
      gtk_spin_button_set_range (size, 1.0, DIAMETER_MAX_MM);
      gtk_spin_button_set_value (size, cal->marker_diameter_mm);
    }
  else if (cal->method == HL_CAL_TWO_POINT)
    {
      gtk_label_set_text (GTK_LABEL (self->size_label), _("Known distance (mm)"));
      gtk_spin_button_set_range (size, 1.0, DISTANCE_MAX_MM);
      gtk_spin_button_set_value (size, cal->known_distance_mm);
    }
  else if (cal->method == HL_CAL_TYPED)
    {
      gtk_label_set_text (GTK_LABEL (self->size_label), _("Magnification factor"));
      gtk_spin_button_set_range (size, HL_MAGNIFICATION_MIN, HL_MAGNIFICATION_MAX);
      gtk_spin_button_set_value (size, cal->magnification);
    }
  int need = points_needed (cal->method);
  gtk_widget_set_visible (self->calibrate_button, need > 0);
  gtk_widget_set_sensitive (self->calibrate_button, rg->present);
  gtk_button_set_label (GTK_BUTTON (self->calibrate_button),
                        self->calibrating ? _("Stop calibrating") : _("Calibrate on the image"));
  if (self->calibrating)
    {
      g_autofree char *t = g_strdup_printf (
        cal->method == HL_CAL_MARKER ? _("Click point %d of %d on the edge of the marker.")
                                     : _("Click point %d of %d: the ends of the known distance."),
        self->n_cal_points + 1, need);
      gtk_label_set_text (GTK_LABEL (self->calibrate_label), t);
    }
  gtk_widget_set_visible (self->calibrate_label, self->calibrating);

  bool assumed;
  double m;
  HlError err;
  hl_error_clear (&err);
  g_autofree char *mag = NULL;
  if (hl_calibration_magnification (cal, &m, &assumed, &err) == HL_OK)
    mag = assumed
      ? g_strdup_printf (_("Magnification %.3f: assumed, not calibrated (mean AP pelvis "
                           "magnification, Brew et al. 2012, J Arthroplasty 27:643-647)"), m)
      : g_strdup_printf (_("Magnification %.*f (measured / true), calibrated"),
                         MAGNIFICATION_DECIMALS, m);
  else
    mag = g_strdup_printf (_("Not calibrated yet (%s): the assumed %.3f is used, "
                             "not calibrated"), err.message, HL_MAGNIFICATION_ASSUMED);
  g_autofree char *mag_source = rg->present
    ? g_strdup_printf (_("%s. Calibration in use: %s."), mag,
                       hl_cal_source_label (hl_image_calibration_source (plan)))
    : g_strdup (mag);
  gtk_label_set_text (GTK_LABEL (self->magnification_label), mag_source);

  gboolean contradiction;
  sync_measures (self, &contradiction);
  set_banner (self->side_banner, contradiction
              ? _("The landmarks contradict the operated side: the operated hip centre lies "
                  "on the other side of the midline. Check the operated side (Case page) and "
                  "the landmarks.")
              : NULL);
  guide_show (self);
  self->syncing--;
}

/* ---- Test hooks -------------------------------------------------------------------- */

void
hl_radiograph_page_print_handles (HlRadiographPage *self)
{
  g_return_if_fail (HL_IS_RADIOGRAPH_PAGE (self));
  hl_ui_print_widget ("radiograph-calibrate", self->calibrate_button);
  hl_ui_print_widget ("radiograph-guide", self->guide_button);
  hl_ui_print_widget ("radiograph-skip", self->skip_button);
  hl_ui_print_widget ("radiograph-back", self->back_button);
  hl_ui_print_widget ("radiograph-stop", self->stop_button);
  /* the spin button's text, not its centre (the buttons are there) */
  GtkWidget *size_text = gtk_widget_get_first_child (self->size_spin);
  hl_ui_print_widget ("radiograph-size", size_text != NULL ? size_text : self->size_spin);

  GtkNative *native = gtk_widget_get_native (GTK_WIDGET (self->canvas));
  graphene_point_t in = GRAPHENE_POINT_INIT (0, 0), out;
  double tx, ty, scale, vx, vy;
  if (native != NULL
      && gtk_widget_compute_point (GTK_WIDGET (self->canvas), GTK_WIDGET (native), &in, &out))
    {
      gtk_native_get_surface_transform (native, &tx, &ty);
      hl_canvas_get_view (self->canvas, &scale, &vx, &vy);
      printf ("VIEW %.9g %.9g %.9g %.9g %.9g\n", scale, vx, vy, out.x + tx, out.y + ty);
    }
  const HlPlan *plan = plan_of (self);
  if (plan->radiograph.present)
    {
      double m = hl_image_display_magnification (plan, NULL);
      printf ("RADIOGRAPH %.9g %.9g %.9g %.9g\n", plan->radiograph.origin_mm.x,
              plan->radiograph.origin_mm.y, hl_image_plan_mm_per_pixel (&plan->radiograph, m),
              m);
    }
}

#if HL_TEST_HOOKS
static gboolean
test_import_cb (gpointer data)
{
  HlRadiographPage *self = data;
  const char *path = g_getenv ("HIPLEVER_TEST_UNDERLAY");
  /* Over the plan's own image the hook keeps the landmarks and the
   * calibration unless told otherwise (HIPLEVER_TEST_IMPORT_ANSWER=ask,
   * keep or clear). */
  const char *answer = g_getenv ("HIPLEVER_TEST_IMPORT_ANSWER");
  self->test_answer = g_strcmp0 (answer, "ask") == 0 ? 0
                      : g_strcmp0 (answer, "clear") == 0 ? 2 : 1;
  if (path != NULL && path[0] != '\0')
    import_file (self, path);
  return G_SOURCE_REMOVE;
}

/* ---- Benchmark ------------------------------------------------------------------------ */

typedef struct {
  HlRadiographPage *self;
  GdkFrameClock *clock;
  gulong before_id, after_id;
  gint64 paint_start_us;
  GArray *paint_ms;
  int frame;
} Bench;

static int
compare_double (const void *a, const void *b)
{
  double x = *(const double *) a, y = *(const double *) b;
  return (x > y) - (x < y);
}

static double
quantile (GArray *a, double q)
{
  if (a->len == 0)
    return NAN;
  qsort (a->data, a->len, sizeof (double), compare_double);
  size_t i = (size_t) floor (q * (a->len - 1) + 0.5);
  return g_array_index (a, double, i);
}

static void
bench_before_cb (GdkFrameClock *clock, Bench *b)
{
  b->paint_start_us = g_get_monotonic_time ();
}

static void
bench_after_cb (GdkFrameClock *clock, Bench *b)
{
  double ms = (g_get_monotonic_time () - b->paint_start_us) / 1000.0;
  if (b->frame > 1)
    g_array_append_val (b->paint_ms, ms);
}

static gboolean
bench_tick_cb (GtkWidget *widget, GdkFrameClock *clock, gpointer data)
{
  Bench *b = data;
  HlCanvas *canvas = b->self->canvas;
  if (b->frame == 0)
    {
      b->clock = clock;
      b->before_id = g_signal_connect (clock, "before-paint", G_CALLBACK (bench_before_cb), b);
      b->after_id = g_signal_connect (clock, "after-paint", G_CALLBACK (bench_after_cb), b);
    }
  if (b->frame >= BENCH_FRAMES)
    {
      printf ("benchmark-underlay: %d x %d image, %d frames of pan and zoom, canvas %d x %d\n",
              BENCH_SIDE, BENCH_SIDE, BENCH_FRAMES, gtk_widget_get_width (GTK_WIDGET (canvas)),
              gtk_widget_get_height (GTK_WIDGET (canvas)));
      printf ("paint per frame: median %.2f ms, p95 %.2f ms (target median <= 8 ms)\n",
              quantile (b->paint_ms, 0.5), quantile (b->paint_ms, BENCH_P95));
      fflush (stdout);
      g_signal_handler_disconnect (b->clock, b->before_id);
      g_signal_handler_disconnect (b->clock, b->after_id);
      g_array_unref (b->paint_ms);
      GtkApplication *app = gtk_window_get_application (GTK_WINDOW (gtk_widget_get_root (GTK_WIDGET (b->self))));
      g_free (b);
      g_application_quit (G_APPLICATION (app));
      return G_SOURCE_REMOVE;
    }
  /* Zoom in for the first half, out for the second, panning throughout. */
  int half = BENCH_FRAMES / 2;
  hl_canvas_zoom_by (canvas, b->frame < half ? BENCH_ZOOM_STEP : 1.0 / BENCH_ZOOM_STEP);
  hl_canvas_pan_by (canvas, (b->frame % 40 < 20 ? 1.0 : -1.0) * BENCH_PAN_PX, BENCH_PAN_PX / 2);
  b->frame++;
  return G_SOURCE_CONTINUE;
}

/* A generated image: smooth shading with fine detail, so that no
 * resampling can take a short cut on flat areas. */
static cairo_surface_t *
bench_image (void)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, BENCH_SIDE, BENCH_SIDE);
  cairo_surface_flush (s);
  unsigned char *data = cairo_image_surface_get_data (s);
  int stride = cairo_image_surface_get_stride (s);
  for (int y = 0; y < BENCH_SIDE; y++)
    {
      guint32 *row = (guint32 *) (data + (gsize) y * stride);
      for (int x = 0; x < BENCH_SIDE; x++)
        {
          guint v = (guint) ((x * 255) / BENCH_SIDE + ((x ^ y) & 31)) & 0xff;
          row[x] = (v << 16) | (v << 8) | v;
        }
    }
  cairo_surface_mark_dirty (s);
  return s;
}

static gboolean
bench_start_cb (gpointer data)
{
  HlRadiographPage *self = data;
  cairo_surface_t *img = bench_image ();
  HlPlan *plan = plan_of (self);
  self->benchmark = TRUE;
  drop_underlay (self);
  self->underlay = hl_underlay_new_from_surface (img);
  cairo_surface_destroy (img);
  hl_image_attach (plan, "benchmark.png", NULL, HL_PIXEL_SPACING_DEFAULT_MM, BENCH_SIDE,
                   BENCH_SIDE);
  hl_canvas_set_underlay (self->canvas, self->underlay);
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
  hl_canvas_fit (self->canvas);
  Bench *b = g_new0 (Bench, 1);
  b->self = self;
  b->paint_ms = g_array_new (FALSE, FALSE, sizeof (double));
  gtk_widget_add_tick_callback (GTK_WIDGET (self->canvas), bench_tick_cb, b, NULL);
  return G_SOURCE_REMOVE;
}

#endif /* HL_TEST_HOOKS */

/* ---- Building ----------------------------------------------------------------------------- */

static void
hl_radiograph_page_dispose (GObject *object)
{
  HlRadiographPage *self = HL_RADIOGRAPH_PAGE (object);
  self->disposed = TRUE;
  self->load_generation++;
  if (self->load_cancel != NULL)
    g_cancellable_cancel (self->load_cancel);
  g_clear_object (&self->load_cancel);
  g_clear_handle_id (&self->pulse_id, g_source_remove);
  if (self->chooser != NULL)
    {
      gtk_native_dialog_destroy (self->chooser);
      g_clear_object (&self->chooser);
    }
  gtk_widget_dispose_template (GTK_WIDGET (object), HL_TYPE_RADIOGRAPH_PAGE);
  G_OBJECT_CLASS (hl_radiograph_page_parent_class)->dispose (object);
}

static void
hl_radiograph_page_finalize (GObject *object)
{
  HlRadiographPage *self = HL_RADIOGRAPH_PAGE (object);
  /* The canvas borrowed the underlay; the window is going: it is not drawn
   * again. */
  g_clear_pointer (&self->underlay, hl_underlay_free);
  g_free (self->loaded_path);
  G_OBJECT_CLASS (hl_radiograph_page_parent_class)->finalize (object);
}

static void
hl_radiograph_page_class_init (HlRadiographPageClass *klass)
{
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  G_OBJECT_CLASS (klass)->dispose = hl_radiograph_page_dispose;
  G_OBJECT_CLASS (klass)->finalize = hl_radiograph_page_finalize;
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-radiograph-page.ui");
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, image_banner);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, side_banner);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, file_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, import_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, schematic_check);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, centre_spin);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, width_spin);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, auto_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, preset_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, window_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, progress);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, burned_banner);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, invert_check);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, opacity_scale);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, spacing_spin);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, method_drop);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, size_spin);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, size_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, calibrate_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, calibrate_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, magnification_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, guide_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, guide_box);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, guide_label);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, skip_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, back_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, stop_button);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, measures_grid);
  gtk_widget_class_bind_template_child (widget_class, HlRadiographPage, caution_label);
}

static void
hl_radiograph_page_init (HlRadiographPage *self)
{
  self->guide_index = 0;
  gtk_widget_init_template (GTK_WIDGET (self));
}

/* What the template cannot hold (ranges of the core, texts of the core)
 * and the controls' signals, connected once the page has its document. */
static void
build (HlRadiographPage *self)
{
  hl_ui_spin_set_range (GTK_SPIN_BUTTON (self->size_spin), 1.0, DIAMETER_MAX_MM, 0.1);
  gtk_spin_button_set_digits (GTK_SPIN_BUTTON (self->size_spin), 3);
  hl_ui_spin_set_range (GTK_SPIN_BUTTON (self->centre_spin), HL_IMAGE_WINDOW_CENTRE_MIN,
                        HL_IMAGE_WINDOW_CENTRE_MAX, 1.0);
  hl_ui_spin_set_range (GTK_SPIN_BUTTON (self->width_spin), HL_IMAGE_WINDOW_WIDTH_MIN,
                        HL_IMAGE_WINDOW_WIDTH_MAX, 1.0);
  hl_ui_spin_set_range (GTK_SPIN_BUTTON (self->spacing_spin), HL_PIXEL_SPACING_MIN_MM,
                        HL_PIXEL_SPACING_MAX_MM, 0.001);
  gtk_spin_button_set_digits (GTK_SPIN_BUTTON (self->spacing_spin), 4);
  gtk_spin_button_set_value (GTK_SPIN_BUTTON (self->spacing_spin), HL_PIXEL_SPACING_DEFAULT_MM);
  gtk_label_set_text (GTK_LABEL (self->caution_label), hl_caution_short ());

  g_signal_connect_object (self->import_button, "clicked", G_CALLBACK (import_clicked_cb), self, 0);
  g_signal_connect_object (self->method_drop, "notify::selected", G_CALLBACK (method_changed_cb),
                           self, 0);
  g_signal_connect_object (self->size_spin, "value-changed", G_CALLBACK (size_changed_cb), self, 0);
  g_signal_connect_object (self->calibrate_button, "clicked", G_CALLBACK (calibrate_clicked_cb),
                           self, 0);
  g_signal_connect_object (self->guide_button, "clicked", G_CALLBACK (guide_clicked_cb), self, 0);
  g_signal_connect_object (self->back_button, "clicked", G_CALLBACK (back_clicked_cb), self, 0);
  g_signal_connect_object (self->skip_button, "clicked", G_CALLBACK (skip_clicked_cb), self, 0);
  g_signal_connect_object (self->stop_button, "clicked", G_CALLBACK (stop_clicked_cb), self, 0);
  g_signal_connect_object (self->schematic_check, "toggled", G_CALLBACK (toggle_cb), self, 0);
  g_signal_connect_object (self->centre_spin, "value-changed", G_CALLBACK (window_spin_cb), self, 0);
  g_signal_connect_object (self->width_spin, "value-changed", G_CALLBACK (window_spin_cb), self, 0);
  g_signal_connect_object (self->auto_button, "clicked", G_CALLBACK (auto_window_cb), self, 0);
  g_signal_connect_object (self->preset_button, "clicked", G_CALLBACK (preset_window_cb), self, 0);
  g_signal_connect_object (self->opacity_scale, "value-changed", G_CALLBACK (scale_changed_cb),
                           self, 0);
  g_signal_connect_object (self->invert_check, "toggled", G_CALLBACK (toggle_cb), self, 0);
  g_signal_connect_object (self->spacing_spin, "value-changed", G_CALLBACK (spacing_changed_cb),
                           self, 0);
}

static void
page_map_cb (GtkWidget *widget, gpointer user_data)
{
  HlRadiographPage *self = HL_RADIOGRAPH_PAGE (widget);

  if (self->stale)
    refresh (self);
}

static void
document_changed_cb (HlDocument *document, guint what, HlRadiographPage *self)
{
  if (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_RESULTS))
    refresh (self);
}

GtkWidget *
hl_radiograph_page_new (HlDocument *document, HlCanvas *canvas)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (document), NULL);
  g_return_val_if_fail (HL_IS_CANVAS (canvas), NULL);
  HlRadiographPage *self = g_object_new (HL_TYPE_RADIOGRAPH_PAGE, NULL);
  self->document = document;
  self->canvas = canvas;
  build (self);
  g_signal_connect_object (canvas, "plan-clicked", G_CALLBACK (plan_clicked_cb), self, 0);
  g_signal_connect_object (document, "changed", G_CALLBACK (document_changed_cb), self, 0);
  g_signal_connect (self, "map", G_CALLBACK (page_map_cb), NULL);
  GtkGesture *wdrag = gtk_gesture_drag_new ();
  gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (wdrag), GDK_BUTTON_SECONDARY);
  g_signal_connect_object (wdrag, "drag-begin", G_CALLBACK (window_drag_begin_cb), self, 0);
  g_signal_connect_object (wdrag, "drag-update", G_CALLBACK (window_drag_update_cb), self, 0);
  gtk_widget_add_controller (GTK_WIDGET (canvas), GTK_EVENT_CONTROLLER (wdrag));
  GtkEventController *keys = gtk_event_controller_key_new ();
  g_signal_connect_object (keys, "key-pressed", G_CALLBACK (window_key_cb), self, 0);
  gtk_widget_add_controller (GTK_WIDGET (canvas), keys);
#if HL_TEST_HOOKS
  if (g_getenv ("HIPLEVER_TEST_UNDERLAY") != NULL)
    g_idle_add_full (G_PRIORITY_DEFAULT_IDLE, test_import_cb, g_object_ref (self), g_object_unref);
  if (g_strcmp0 (g_getenv ("HIPLEVER_BENCHMARK_UNDERLAY"), "1") == 0)
    g_idle_add_full (G_PRIORITY_DEFAULT_IDLE, bench_start_cb, g_object_ref (self), g_object_unref);
#endif
  refresh (self);
  return GTK_WIDGET (self);
}

HlUnderlay *
hl_radiograph_page_get_underlay (HlRadiographPage *self)
{
  g_return_val_if_fail (HL_IS_RADIOGRAPH_PAGE (self), NULL);
  const HlRadiograph *rg = &plan_of (self)->radiograph;
  if (!rg->present || self->underlay == NULL || g_strcmp0 (self->loaded_path, rg->path) != 0)
    return NULL;
  return self->underlay;
}

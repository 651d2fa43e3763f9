/* hl-window.c: the window's life, the plan it holds and recomputing.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-window"

#include <string.h>
#include <glib/gi18n.h>

#include "hl-a11y.h"
#include "hl-plan-io.h"
#include "hl-autosave.h"
#include "hl-analysis-panel.h"
#include "hl-charts-view.h"
#include "hl-export.h"
#include "hl-message.h"
#include "hl-radiograph-page.h"
#include "hl-version.h"
#include "hl-window.h"
#include "hl-window-private.h"
#include "hl-template-panel.h"
#include "hl-template-shape.h"
#include "hl-template-tool.h"

G_DEFINE_FINAL_TYPE (HlWindow, hl_window, GTK_TYPE_APPLICATION_WINDOW)

gboolean
hl_window_is_modified (HlWindow *self)
{
  return hl_document_is_modified (self->document);
}

char *
hl_window_format_error (const HlError *err)
{
  return hl_document_format_error (err);
}

int
hl_window_selected_option (HlWindow *self)
{
  return hl_document_get_selected_option (self->document);
}

HlDocument *
hl_window_get_document (HlWindow *self)
{
  g_return_val_if_fail (HL_IS_WINDOW (self), NULL);
  return self->document;
}

void
hl_window_show_error (HlWindow *self, const char *primary,
                      const char *secondary)
{
  hl_message_show_error (GTK_WIDGET (self), primary, secondary);
}

void
hl_window_update_title (HlWindow *self)
{
  const char *label = hl_window_get_plan (self)->label[0] != '\0' ? hl_window_get_plan (self)->label
                                                    : _("Untitled case");
  g_autofree char *title = NULL;
  g_autofree char *recovered = hl_autosave_is_recovered (GTK_WINDOW (self))
                               ? g_strdup_printf (_("%s (recovered)"), label) : NULL;

  if (recovered != NULL)
    label = recovered;
  /* The product name stays last so tests and window lists can find it. */
  if (hl_window_is_modified (self))
    title = g_strdup_printf ("• %s — hiplever", label);
  else
    title = g_strdup_printf ("%s — hiplever", label);
  if (g_strcmp0 (gtk_window_get_title (GTK_WINDOW (self)), title) != 0)
    gtk_window_set_title (GTK_WINDOW (self), title);
}

void
hl_window_update_actions (HlWindow *self)
{
  GtkWidget *w = GTK_WIDGET (self);
  int selected = hl_window_selected_option (self);
  gboolean has_option = selected >= 0 && (size_t) selected < hl_window_get_plan (self)->n_options;

  gtk_widget_action_set_enabled (w, "win.undo", hl_document_can_undo (self->document));
  gtk_widget_action_set_enabled (w, "win.redo", hl_document_can_redo (self->document));
  gtk_widget_action_set_enabled (w, "win.duplicate-option", has_option);
  gtk_widget_action_set_enabled (w, "win.remove-option", has_option);
}

static void
hl_window_update_status (HlWindow *self)
{
  g_autofree char *where = NULL;
  g_autofree char *text = NULL;
  GFile *file = hl_document_get_file (self->document);
  const HlSolved *solved = hl_document_get_solved (self->document, NULL);

  if (file != NULL)
    where = g_file_get_parse_name (file);
  else
    where = g_strdup (_("not saved under a name yet"));
  if (solved[0].status != HL_OK)
    {
      g_autofree char *msg = hl_window_format_error (&solved[0].error);

      text = g_strdup_printf (_("Plan: %s  ·  Cannot solve: %s"), where, msg);
      gtk_widget_add_css_class (GTK_WIDGET (self->status_label), "error");
    }
  else
    {
      text = g_strdup_printf (_("Plan: %s  ·  %zu reconstruction options  ·  body weight %.0f N"),
                              where, hl_window_get_plan (self)->n_options,
                              hl_plan_body_weight (hl_window_get_plan (self)));
      gtk_widget_remove_css_class (GTK_WIDGET (self->status_label), "error");
    }
  if (g_strcmp0 (gtk_label_get_text (self->status_label), text) != 0)
    gtk_label_set_text (self->status_label, text);
}

/* What every change of the document does to the window itself; the
 * views under it follow the document on their own. */
static void
document_changed_cb (HlDocument *document, guint what, HlWindow *self)
{
  if (self->disposing)
    return;
  if (what & (HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_FILE
              | HL_DOCUMENT_CHANGED_RESULTS))
    {
      hl_window_update_title (self);
      hl_window_update_status (self);
    }
  hl_window_update_actions (self);
  self->handles_dirty = TRUE;
}

static void
document_error_cb (HlDocument *document, const char *primary, const char *secondary,
                   HlWindow *self)
{
  hl_window_show_error (self, primary, secondary);
}

void
hl_window_select_option (HlWindow *self, int index)
{
  hl_document_select_option (self->document, index);
}

/* A whole new plan: undo history goes, the view is fitted again. */
static void
template_panel_changed_cb (gpointer panel, gpointer self)
{
  HL_WINDOW (self)->handles_dirty = TRUE;
}

static void
template_selected_cb (GObject *canvas, GParamSpec *pspec, HlWindow *self)
{
  self->handles_dirty = TRUE;
}

void
hl_window_replace_plan (HlWindow *self, const HlPlan *plan, GFile *file)
{
  /* Templated options are resolved against the catalogues at hand; a
   * missing or changed catalogue is said, never silently re-derived. */
  g_autofree char *warnings = NULL;
  HlPlan *resolved = plan != NULL ? hl_plan_copy (plan) : NULL;
  if (resolved != NULL)
    hl_catalogue_registry_resolve (resolved, &warnings);
  if (hl_document_replace (self->document, resolved != NULL ? resolved : plan, file))
    hl_autosave_plan_replaced (GTK_WINDOW (self));
  hl_plan_free (resolved);
  hl_template_panel_set_warnings (hl_options_page_get_template_panel (self->options_page),
                                  warnings);
  if (warnings != NULL)
    hl_message_show_status (GTK_WIDGET (self),
                            _("An implant catalogue of this plan is missing or has changed: "
                              "see Options, Implants. The saved numbers stand."));
}

void
hl_window_set_plan (HlWindow *self, const HlPlan *plan)
{
  g_return_if_fail (HL_IS_WINDOW (self));
  hl_window_replace_plan (self, plan, NULL);
}

const HlPlan *
hl_window_get_plan (HlWindow *self)
{
  g_return_val_if_fail (HL_IS_WINDOW (self), NULL);
  return hl_document_get_plan (self->document);
}

gboolean
hl_window_load_file (HlWindow *self, GFile *file, gboolean report, HlError *err)
{
  g_autofree char *path = g_file_get_path (file);
  g_autofree char *name = g_file_get_basename (file);
  HlPlan *loaded = NULL;
  HlError local;
  HlStatus st;
  gboolean is_plan;

  hl_error_clear (&local);
  if (path == NULL)
    {
      hl_error_set (&local, HL_ERR_IO, "file", "%s", _("only local files can be opened"));
      st = HL_ERR_IO;
    }
  else
    st = hl_plan_load_file (path, &loaded, &local);

  if (st != HL_OK)
    {
      if (report)
        {
          g_autofree char *primary = g_strdup_printf (_("Could not open “%s”"), name);
          g_autofree char *secondary = hl_window_format_error (&local);
          g_autofree char *text = g_strdup_printf (local.status == HL_ERR_VERSION
                                                   ? _("%s\n\nThe file is left as it is and is "
                                                       "never written over; the plan that was "
                                                       "open is unchanged.")
                                                   : _("%s\n\nThe plan that was open is unchanged."),
                                                   secondary);

          hl_window_show_error (self, primary, text);
        }
      if (err != NULL)
        *err = local;
      return FALSE;
    }

  /* A summary opens as a plan without a name, so Save never overwrites
   * the summary with a plan file. */
  is_plan = g_str_has_suffix (path, HL_PLAN_FILE_EXTENSION);
  hl_window_replace_plan (self, loaded, is_plan ? file : NULL);
  hl_plan_free (loaded);
  return TRUE;
}

gboolean
hl_window_show_panel (HlWindow *self, const char *name)
{
  g_return_val_if_fail (HL_IS_WINDOW (self), FALSE);
  if (name == NULL || gtk_stack_get_child_by_name (self->panel_stack, name) == NULL)
    return FALSE;
  gtk_stack_set_visible_child_name (self->panel_stack, name);
  return TRUE;
}

void
hl_window_set_dump_path (HlWindow *self, const char *path)
{
  g_return_if_fail (HL_IS_WINDOW (self));
  g_free (self->dump_path);
  self->dump_path = g_strdup (path);
}

void
hl_window_set_skip_close_guard (HlWindow *self, gboolean skip)
{
  g_return_if_fail (HL_IS_WINDOW (self));
  self->skip_close_guard = skip;
}

void
hl_window_set_print_handles (HlWindow *self, gboolean print)
{
  g_return_if_fail (HL_IS_WINDOW (self));
#if HL_TEST_HOOKS
  if (print && !self->print_handles)
    hl_window_start_print_handles (self);
#endif
  self->print_handles = print;
  self->handles_dirty = TRUE;
}

/* ---- canvas --------------------------------------------------------- */

static void
landmark_drag_begin_cb (HlCanvas *canvas, int id, HlWindow *self)
{
  hl_document_begin_drag (self->document);
}

static void
landmark_moved_cb (HlCanvas *canvas, int id, double x, double y, HlWindow *self)
{
  hl_document_move_landmark (self->document, (HlLandmarkId) id, x, y);
}

static void
landmark_drag_end_cb (HlCanvas *canvas, int id, gboolean cancelled,
                      HlWindow *self)
{
  hl_document_end_drag (self->document, cancelled);
}

/* The side mirrors the schematic's landmarks: the view is fitted again. */
static void
case_side_changed_cb (HlCasePage *page, HlWindow *self)
{
  hl_canvas_fit (self->canvas);
}

/* A row of the landmark table selected: the same landmark on the schematic. */
static void
page_selected_landmark_cb (HlLandmarksPage *page, GParamSpec *pspec, HlWindow *self)
{
  int id = hl_landmarks_page_get_selected_landmark (page);

  if (!self->disposing && hl_canvas_get_selected_landmark (self->canvas) != id)
    hl_canvas_set_selected_landmark (self->canvas, id);
}

static void
canvas_selected_landmark_cb (HlCanvas *canvas, GParamSpec *pspec, HlWindow *self)
{
  if (self->disposing)
    return;
  hl_landmarks_page_set_selected_landmark (self->landmarks_page,
                                           hl_canvas_get_selected_landmark (canvas));
  self->handles_dirty = TRUE;
}

static void
canvas_selected_option_cb (HlCanvas *canvas, GParamSpec *pspec, HlWindow *self)
{
  int index = hl_canvas_get_selected_option (canvas);

  if (!self->disposing && index != hl_window_selected_option (self))
    hl_window_select_option (self, index);
}

/* ---- caution -------------------------------------------------------- */

static void
caution_toggled_cb (GtkToggleButton *button, HlWindow *self)
{
  gboolean expanded = gtk_toggle_button_get_active (button);

  gtk_revealer_set_reveal_child (self->caution_revealer, expanded);
  gtk_widget_set_visible (GTK_WIDGET (self->caution_short_label), !expanded);
  gtk_button_set_label (GTK_BUTTON (button),
                        expanded ? _("Collapse") : _("Show full caution"));
  self->handles_dirty = TRUE;
}

/* ---- analysis and charts ---------------------------------------------- */

/* The handle printer prints after frames in which something moved. */
static void
handles_moved_cb (HlWindow *self)
{
  self->handles_dirty = TRUE;
}

static void
show_lower_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  HlWindow *self = user_data;

  gtk_stack_set_visible_child_name (self->lower_stack,
                                    g_str_equal (g_action_get_name (G_ACTION (action)),
                                                 "show-charts") ? "charts" : "results");
}

static void
show_analysis_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  hl_window_show_panel (HL_WINDOW (user_data), "analysis");
}

static const GActionEntry lower_actions[] = {
  { "show-results", show_lower_cb, NULL, NULL, NULL, { 0 } },
  { "show-charts", show_lower_cb, NULL, NULL, NULL, { 0 } },
  { "show-analysis", show_analysis_cb, NULL, NULL, NULL, { 0 } },
};

static void
attach_analysis (HlWindow *self)
{
  self->analysis_panel = HL_ANALYSIS_PANEL (hl_analysis_panel_new (self->document));
  gtk_stack_add_titled (self->panel_stack, GTK_WIDGET (self->analysis_panel),
                        "analysis", _("Analysis"));
  g_signal_connect_object (self->analysis_panel, "shown-changed",
                           G_CALLBACK (handles_moved_cb), self, G_CONNECT_SWAPPED);
  g_action_map_add_action_entries (G_ACTION_MAP (self), lower_actions,
                                   G_N_ELEMENTS (lower_actions), self);
  hl_charts_view_set_document (HL_CHARTS_VIEW (self->charts_view), self->document);
  g_signal_connect_object (self->charts_view, "computed", G_CALLBACK (handles_moved_cb),
                           self, G_CONNECT_SWAPPED);
  g_signal_connect_object (self->charts_view, "notify::kind", G_CALLBACK (handles_moved_cb),
                           self, G_CONNECT_SWAPPED);
  g_signal_connect_object (self->charts_view, "notify::show-bands",
                           G_CALLBACK (handles_moved_cb), self, G_CONNECT_SWAPPED);
  g_signal_connect_object (self->lower_stack, "notify::visible-child",
                           G_CALLBACK (handles_moved_cb), self, G_CONNECT_SWAPPED);
}

/* ---- life ----------------------------------------------------------- */

static gboolean
hl_window_close_request_vfunc (GtkWindow *window)
{
  HlWindow *self = HL_WINDOW (window);

  if (hl_window_close_request (self))
    return TRUE;
  return GTK_WINDOW_CLASS (hl_window_parent_class)->close_request (window);
}

static void
hl_window_dispose (GObject *object)
{
  HlWindow *self = HL_WINDOW (object);

  /* Lists emit selection changes while their rows are removed. */
  self->disposing = TRUE;
  if (self->chooser != NULL)
    {
      gtk_native_dialog_destroy (self->chooser);
      g_clear_object (&self->chooser);
    }
  if (self->guard_dialog != NULL)
    {
      gtk_window_destroy (GTK_WINDOW (self->guard_dialog));
      self->guard_dialog = NULL;
    }
  gtk_widget_dispose_template (GTK_WIDGET (self), HL_TYPE_WINDOW);
  G_OBJECT_CLASS (hl_window_parent_class)->dispose (object);
}

static void
hl_window_finalize (GObject *object)
{
  HlWindow *self = HL_WINDOW (object);

  g_clear_object (&self->document);
  g_clear_pointer (&self->dump_path, g_free);
  G_OBJECT_CLASS (hl_window_parent_class)->finalize (object);
}

static void
hl_window_class_init (HlWindowClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);
  GtkWindowClass *window_class = GTK_WINDOW_CLASS (klass);

  object_class->dispose = hl_window_dispose;
  object_class->finalize = hl_window_finalize;
  window_class->close_request = hl_window_close_request_vfunc;

  g_type_ensure (HL_TYPE_AIDS_PAGE);
  g_type_ensure (HL_TYPE_CASE_PAGE);
  g_type_ensure (HL_TYPE_LANDMARKS_PAGE);
  g_type_ensure (HL_TYPE_OPTIONS_PAGE);
  g_type_ensure (HL_TYPE_CANVAS);
  g_type_ensure (HL_TYPE_RESULTS);
  g_type_ensure (HL_TYPE_CHARTS_VIEW);

  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/hiplever/Hiplever/hl-window.ui");
  gtk_widget_class_bind_template_child (widget_class, HlWindow, caution_toggle);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, caution_revealer);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, caution_short_label);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, caution_full_label);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, canvas);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, results);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, panel_stack);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, status_label);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, lower_stack);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, charts_view);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, case_page);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, landmarks_page);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, options_page);
  gtk_widget_class_bind_template_child (widget_class, HlWindow, aids_page);
  hl_window_actions_class_init (widget_class);
}

/* The lower area's share of the height under the caution strip when the
 * window first opens (never below its smallest height); the schematic
 * takes every later change of the window's height. */
#define HL_LOWER_SHARE 0.4

static gboolean
first_split_tick_cb (GtkWidget *paned, GdkFrameClock *clock, gpointer data)
{
  int height = gtk_widget_get_height (paned);

  if (height <= 0)
    return G_SOURCE_CONTINUE;
  gtk_paned_set_position (GTK_PANED (paned), (int) lround ((1.0 - HL_LOWER_SHARE) * height));
  return G_SOURCE_REMOVE;
}

static void
hl_window_init (HlWindow *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));

  self->document = hl_document_new ();

  gtk_label_set_text (self->caution_short_label, hl_caution_short ());
  gtk_label_set_text (self->caution_full_label, hl_caution_text ());
  g_signal_connect_object (self->caution_toggle, "toggled",
                           G_CALLBACK (caution_toggled_cb), self, 0);
  caution_toggled_cb (self->caution_toggle, self);

  g_signal_connect_object (self->canvas, "landmark-drag-begin",
                           G_CALLBACK (landmark_drag_begin_cb), self, 0);
  g_signal_connect_object (self->canvas, "landmark-moved",
                           G_CALLBACK (landmark_moved_cb), self, 0);
  g_signal_connect_object (self->canvas, "landmark-drag-end",
                           G_CALLBACK (landmark_drag_end_cb), self, 0);
  g_signal_connect_object (self->canvas, "notify::selected-landmark",
                           G_CALLBACK (canvas_selected_landmark_cb), self, 0);
  g_signal_connect_object (self->canvas, "notify::selected-option",
                           G_CALLBACK (canvas_selected_option_cb), self, 0);

  gtk_widget_add_tick_callback (gtk_widget_get_parent (GTK_WIDGET (self->canvas)),
                                first_split_tick_cb, NULL, NULL);
  hl_canvas_set_document (self->canvas, self->document);
  hl_results_set_document (self->results, self->document);
  hl_aids_page_set_document (self->aids_page, self->document);
  hl_case_page_set_document (self->case_page, self->document);
  g_signal_connect_object (self->case_page, "side-changed",
                           G_CALLBACK (case_side_changed_cb), self, 0);
  hl_landmarks_page_set_document (self->landmarks_page, self->document);
  g_signal_connect_object (self->landmarks_page, "notify::selected-landmark",
                           G_CALLBACK (page_selected_landmark_cb), self, 0);
  hl_options_page_set_document (self->options_page, self->document);
  hl_template_tool_attach (self->canvas, self->document);
  GtkWidget *template_panel = hl_options_page_get_template_panel (self->options_page);
  hl_template_panel_set_changed_func (template_panel, template_panel_changed_cb, self);
  hl_template_panel_setup_catalogues (template_panel, GTK_WINDOW (self), G_ACTION_MAP (self));
  g_signal_connect_object (self->canvas, "notify::selected-template",
                           G_CALLBACK (template_selected_cb), self, 0);
  self->radiograph_page = HL_RADIOGRAPH_PAGE (hl_radiograph_page_new (self->document,
                                                                      self->canvas));
  gtk_stack_add_titled (self->panel_stack, GTK_WIDGET (self->radiograph_page),
                        "radiograph", _("Radiograph"));
  attach_analysis (self);
  hl_export_attach (GTK_APPLICATION_WINDOW (self), self->document, self->analysis_panel,
                    self->radiograph_page);
  hl_autosave_attach (GTK_WINDOW (self), self->document);
  hl_a11y_label_controls (GTK_WIDGET (self));
  g_signal_connect_object (self->document, "changed",
                           G_CALLBACK (document_changed_cb), self, 0);
  g_signal_connect_object (self->document, "error",
                           G_CALLBACK (document_error_cb), self, 0);
  /* Every view shows the plan the document starts with. */
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_PLAN);
}

HlWindow *
hl_window_new (GtkApplication *app)
{
  return g_object_new (HL_TYPE_WINDOW, "application", app, NULL);
}

/* hl-window-actions.c: the window's actions, files and the guard against
 * losing unsaved changes.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-window-actions"

#include <glib/gi18n.h>

#include "hl-autosave.h"
#include "hl-export.h"
#include "hl-message.h"
#include "hl-path.h"
#include "hl-plan-io.h"
#include "hl-settings.h"
#include "hl-window.h"
#include "hl-window-private.h"

#define HL_AFTER_KEY "hl-after-guard"
#define HL_ZOOM_STEP 1.25

static void hl_window_save_as (HlWindow *self, HlAfterGuard then);
static void hl_window_show_open_chooser (HlWindow *self);
static void hl_window_start_new_plan (HlWindow *self);

/* ---- helpers -------------------------------------------------------- */

static void
continue_after_guard (HlWindow *self, HlAfterGuard then)
{
  switch (then)
    {
    case HL_AFTER_CLOSE:
      self->close_confirmed = TRUE;
      gtk_window_close (GTK_WINDOW (self));
      break;
    case HL_AFTER_OPEN:
      hl_window_show_open_chooser (self);
      break;
    case HL_AFTER_NEW:
      hl_window_start_new_plan (self);
      break;
    case HL_AFTER_NOTHING:
    default:
      break;
    }
}

static gboolean
save_to (HlWindow *self, GFile *file)
{
  g_autofree char *path = g_file_get_path (file);
  HlError err;

  hl_error_clear (&err);
  if (path == NULL)
    hl_error_set (&err, HL_ERR_IO, "file", "%s", _("only local files can be saved"));
  else if (!hl_document_output_is_input (self->document, path, TRUE, &err)
           && !hl_autosave_target_is_newer (path, &err))
    hl_plan_save_file_backup (hl_window_get_plan (self), path, &err);

  if (err.status != HL_OK)
    {
      g_autofree char *name = g_file_get_parse_name (file);
      g_autofree char *primary = g_strdup_printf (_("Could not save “%s”"), name);
      g_autofree char *msg = hl_window_format_error (&err);
      g_autofree char *secondary = g_strdup_printf (_("%s\n\nThe plan is still open with its changes; nothing was lost."), msg);

      hl_window_show_error (self, primary, secondary);
      return FALSE;
    }

  /* The autosave goes first: the title that follows is no longer "recovered". */
  hl_autosave_saved (GTK_WINDOW (self));
  hl_document_set_saved (self->document, file);
  return TRUE;
}

static GtkFileFilter *
filter_new (const char *name, const char *pattern, const char *pattern2)
{
  GtkFileFilter *filter = gtk_file_filter_new ();

  gtk_file_filter_set_name (filter, name);
  gtk_file_filter_add_pattern (filter, pattern);
  if (pattern2 != NULL)
    gtk_file_filter_add_pattern (filter, pattern2);
  return filter;
}

static void
set_chooser (HlWindow *self, GtkFileChooserNative *chooser)
{
  if (self->chooser != NULL)
    {
      gtk_native_dialog_destroy (self->chooser);
      g_clear_object (&self->chooser);
    }
  self->chooser = GTK_NATIVE_DIALOG (chooser);
}

static GFile *
take_chooser_file (HlWindow *self, GtkNativeDialog *dialog, int response)
{
  GFile *file = NULL;

  if (response == GTK_RESPONSE_ACCEPT)
    file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (dialog));
  if (self->chooser == dialog)
    {
      gtk_native_dialog_destroy (dialog);
      g_clear_object (&self->chooser);
    }
  return file;
}

static char *
suggested_name (HlWindow *self, const char *suffix)
{
  return hl_path_suggested_name (hl_window_get_plan (self)->label, _("case"), suffix);
}

/* ---- open ----------------------------------------------------------- */

static void
open_response_cb (GtkNativeDialog *dialog, int response, HlWindow *self)
{
  g_autoptr(GFile) file = take_chooser_file (self, dialog, response);

  if (file != NULL)
    hl_window_load_file (self, file, TRUE, NULL);
}

static void
hl_window_show_open_chooser (HlWindow *self)
{
  GtkFileChooserNative *chooser;
  g_autoptr(GtkFileFilter) both = filter_new (_("Plans and planning summaries"),
                                              "*" HL_PLAN_FILE_EXTENSION, "*.xml");
  g_autoptr(GtkFileFilter) plans = filter_new (_("Plans (*.hlplan)"),
                                               "*" HL_PLAN_FILE_EXTENSION, NULL);
  g_autoptr(GtkFileFilter) summaries = filter_new (_("Planning summaries (*.xml)"),
                                                   "*.xml", NULL);

  chooser = gtk_file_chooser_native_new (_("Open a Plan"), GTK_WINDOW (self),
                                         GTK_FILE_CHOOSER_ACTION_OPEN,
                                         _("_Open"), _("_Cancel"));
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), both);
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), plans);
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), summaries);
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (chooser), TRUE);
  hl_settings_track_chooser (chooser);
  g_signal_connect_object (chooser, "response", G_CALLBACK (open_response_cb), self, 0);
  set_chooser (self, chooser);
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (chooser));
}

/* ---- the guard ------------------------------------------------------ */

typedef struct {
  HlWindow *self;
  HlAfterGuard then;
  int response;
} HlGuardAnswer;

/* Runs once the dialog is gone: closing the window from inside the
 * dialog's own response would free its parent under it. */
static gboolean
guard_answer_idle_cb (gpointer user_data)
{
  HlGuardAnswer *answer = user_data;
  HlWindow *self = answer->self;
  HlAfterGuard then = answer->then;

  switch (answer->response)
    {
    case GTK_RESPONSE_ACCEPT:
      if (hl_document_get_file (self->document) == NULL)
        hl_window_save_as (self, then);
      else if (save_to (self, hl_document_get_file (self->document)))
        continue_after_guard (self, then);
      break;
    case GTK_RESPONSE_REJECT:
      continue_after_guard (self, then);
      break;
    default:
      break;
    }
  g_object_unref (self);
  g_free (answer);
  return G_SOURCE_REMOVE;
}

static void
guard_response_cb (GtkDialog *dialog, int response, HlWindow *self)
{
  HlGuardAnswer *answer = g_new0 (HlGuardAnswer, 1);

  answer->self = g_object_ref (self);
  answer->then = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (dialog), HL_AFTER_KEY));
  answer->response = response;
  self->guard_dialog = NULL;
  gtk_window_destroy (GTK_WINDOW (dialog));
  g_idle_add (guard_answer_idle_cb, answer);
}

static void
hl_window_guard (HlWindow *self, HlAfterGuard then)
{
  GtkWidget *dialog;
  const char *label = hl_window_get_plan (self)->label[0] != '\0' ? hl_window_get_plan (self)->label : _("Untitled case");

  if (!hl_window_is_modified (self) || self->skip_close_guard)
    {
      continue_after_guard (self, then);
      return;
    }
  if (self->guard_dialog != NULL)
    {
      gtk_window_present (GTK_WINDOW (self->guard_dialog));
      return;
    }

  dialog = gtk_message_dialog_new (GTK_WINDOW (self),
                                   GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                   GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                   then == HL_AFTER_OPEN
                                   ? _("Save the changes to “%s” before opening another plan?")
                                   : then == HL_AFTER_NEW
                                   ? _("Save the changes to “%s” before starting a new plan?")
                                   : _("Save the changes to “%s” before closing?"),
                                   label);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (dialog), "%s",
                                            _("Changes that are not saved will be lost."));
  gtk_dialog_add_buttons (GTK_DIALOG (dialog),
                          _("_Cancel"), GTK_RESPONSE_CANCEL,
                          _("_Discard"), GTK_RESPONSE_REJECT,
                          _("_Save"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_ACCEPT);
  gtk_window_set_title (GTK_WINDOW (dialog), _("Unsaved changes"));
  g_object_set_data (G_OBJECT (dialog), HL_AFTER_KEY, GINT_TO_POINTER (then));
  g_signal_connect_object (dialog, "response", G_CALLBACK (guard_response_cb), self, 0);
  self->guard_dialog = dialog;
  gtk_window_present (GTK_WINDOW (dialog));
}

gboolean
hl_window_close_request (HlWindow *self)
{
  if (self->close_confirmed || self->skip_close_guard || !hl_window_is_modified (self))
    {
#if HL_TEST_HOOKS
      hl_window_write_dump (self);
#endif
      hl_autosave_closed (GTK_WINDOW (self));
      return FALSE;
    }
  hl_window_guard (self, HL_AFTER_CLOSE);
  return TRUE;
}

/* ---- save ----------------------------------------------------------- */

static void
save_as_response_cb (GtkNativeDialog *dialog, int response, HlWindow *self)
{
  HlAfterGuard then = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (dialog), HL_AFTER_KEY));
  g_autoptr(GFile) chosen = take_chooser_file (self, dialog, response);
  g_autoptr(GFile) file = NULL;

  if (chosen == NULL)
    return;
  file = hl_export_with_extension (chosen, HL_PLAN_FILE_EXTENSION);
  if (save_to (self, file))
    continue_after_guard (self, then);
}

static void
hl_window_save_as (HlWindow *self, HlAfterGuard then)
{
  GtkFileChooserNative *chooser;
  g_autoptr(GtkFileFilter) plans = filter_new (_("Plans (*.hlplan)"),
                                               "*" HL_PLAN_FILE_EXTENSION, NULL);
  g_autofree char *name = suggested_name (self, HL_PLAN_FILE_EXTENSION);

  chooser = gtk_file_chooser_native_new (_("Save the Plan"), GTK_WINDOW (self),
                                         GTK_FILE_CHOOSER_ACTION_SAVE,
                                         _("_Save"), _("_Cancel"));
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), plans);
  /* A plan with a file starts in that file's folder, not the last one. */
  if (hl_document_get_file (self->document) != NULL)
    {
      hl_settings_remember_chooser (chooser);
      gtk_file_chooser_set_file (GTK_FILE_CHOOSER (chooser), hl_document_get_file (self->document), NULL);
    }
  else
    {
      hl_settings_track_chooser (chooser);
      gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (chooser), name);
    }
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (chooser), TRUE);
  g_object_set_data (G_OBJECT (chooser), HL_AFTER_KEY, GINT_TO_POINTER (then));
  g_signal_connect_object (chooser, "response", G_CALLBACK (save_as_response_cb), self, 0);
  set_chooser (self, chooser);
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (chooser));
}

static void
export_response_cb (GtkNativeDialog *dialog, int response, HlWindow *self)
{
  g_autoptr(GFile) chosen = take_chooser_file (self, dialog, response);
  g_autoptr(GFile) file = NULL;
  g_autofree char *path = NULL;
  HlError err;

  if (chosen == NULL)
    return;
  file = hl_export_with_extension (chosen, ".xml");
  path = g_file_get_path (file);
  hl_error_clear (&err);
  if (path == NULL)
    hl_error_set (&err, HL_ERR_IO, "file", "%s", _("only local files can be written"));
  else if (!hl_document_output_is_input (self->document, path, FALSE, &err))
    hl_summary_save_file (hl_window_get_plan (self), path, &err);
  if (err.status != HL_OK)
    {
      g_autofree char *name = g_file_get_parse_name (file);
      g_autofree char *primary = g_strdup_printf (_("Could not export the planning summary to “%s”"), name);
      g_autofree char *msg = hl_window_format_error (&err);

      hl_window_show_error (self, primary, msg);
      return;
    }
  {
    g_autofree char *name = g_file_get_parse_name (file);
    g_autofree char *text = g_strdup_printf (_("Planning summary written to %s"), name);

    gtk_label_set_text (self->status_label, text);
  }
}

/* ---- options -------------------------------------------------------- */

/* False, with a message, when the plan already holds the most options a
 * plan may (HL_PLAN_MAX_OPTIONS). */
static gboolean
hl_window_option_room (HlWindow *self)
{
  if (hl_window_get_plan (self)->n_options < HL_PLAN_MAX_OPTIONS)
    return TRUE;
  g_autofree char *detail =
    g_strdup_printf (_("A plan holds at most %d options; remove one before adding "
                       "another."), HL_PLAN_MAX_OPTIONS);
  hl_window_show_error (self, _("The option was not added"), detail);
  return FALSE;
}

void
hl_window_add_option (HlWindow *self)
{
  g_autofree char *name = NULL;
  HlPlan *plan;
  long index;

  for (unsigned k = (unsigned) hl_window_get_plan (self)->n_options + 1; name == NULL; k++)
    {
      g_autofree char *candidate = g_strdup_printf (_("Option %u"), k);
      gboolean used = FALSE;

      for (size_t i = 0; i < hl_window_get_plan (self)->n_options && !used; i++)
        used = g_strcmp0 (hl_window_get_plan (self)->options[i].name, candidate) == 0;
      if (!used)
        name = g_steal_pointer (&candidate);
    }
  if (!hl_window_option_room (self))
    return;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return;
  index = hl_plan_add_option (plan, name, NULL);
  if (index < 0)
    {
      hl_window_show_error (self, _("Out of memory"), _("The option was not added."));
      return;
    }
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_OPTIONS);
  hl_window_select_option (self, (int) index);
}

void
hl_window_duplicate_option (HlWindow *self)
{
  HlPlan *plan;
  long index;

  if (hl_window_selected_option (self) < 0 || !hl_window_option_room (self))
    return;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return;
  index = hl_plan_duplicate_option (plan, (size_t) hl_window_selected_option (self));
  if (index < 0)
    {
      hl_window_show_error (self, _("Out of memory"), _("The option was not duplicated."));
      return;
    }
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_OPTIONS);
  hl_window_select_option (self, (int) index);
}

void
hl_window_remove_option (HlWindow *self)
{
  int index = hl_window_selected_option (self);
  HlPlan *plan;

  if (index < 0 || (size_t) index >= hl_window_get_plan (self)->n_options)
    return;
  hl_document_break_coalescing (self->document);
  if ((plan = hl_document_begin_edit (self->document, NULL)) == NULL)
    return;
  hl_plan_remove_option (plan, (size_t) index);
  if ((size_t) index >= plan->n_options)
    index = (int) plan->n_options - 1;
  hl_document_end_edit (self->document, HL_DOCUMENT_CHANGED_OPTIONS);
  hl_window_select_option (self, index);
}

/* ---- undo ----------------------------------------------------------- */

void
hl_window_undo (HlWindow *self)
{
  hl_document_undo (self->document);
}

void
hl_window_redo (HlWindow *self)
{
  hl_document_redo (self->document);
}

/* ---- action callbacks ----------------------------------------------- */

/* A new plan starts from the schematic with every landmark at the
 * invented adult geometry of model.md section 2 (plausible defaults), the
 * model defaults of the settings, no options and no radiograph; the
 * status line says which landmarks to move first. */
static void
hl_window_start_new_plan (HlWindow *self)
{
  HlPlan *plan = hl_plan_new ();
  if (plan == NULL)
    {
      hl_window_show_error (self, _("No new plan"), _("out of memory"));
      return;
    }
  hl_plan_set_demo_landmarks (plan);
  hl_settings_apply_model_defaults (plan);
  g_strlcpy (plan->label, _("New plan"), sizeof plan->label);
  hl_window_replace_plan (self, plan, NULL);
  hl_plan_free (plan);
  hl_window_show_panel (self, "landmarks");

  GString *required = g_string_new (NULL);
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      if (!info->required)
        continue;
      if (required->len > 0)
        g_string_append (required, ", ");
      g_string_append (required, _(info->label));
    }
  g_autofree char *text = g_strdup_printf (
    _("New plan: every landmark is at a plausible default of an invented adult hip. "
      "Move the required ones to the patient (%s), then the optional ones; set the "
      "case label, body mass and operated side."), required->str);
  g_string_free (required, TRUE);
  hl_message_show_status (GTK_WIDGET (self), text);
}

static void
new_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_guard (HL_WINDOW (widget), HL_AFTER_NEW);
}

static void
open_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_guard (HL_WINDOW (widget), HL_AFTER_OPEN);
}

static void
save_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  HlWindow *self = HL_WINDOW (widget);

  if (hl_document_get_file (self->document) == NULL)
    hl_window_save_as (self, HL_AFTER_NOTHING);
  else if (!hl_autosave_confirm_save (GTK_WINDOW (self)))
    save_to (self, hl_document_get_file (self->document));
}

static void
save_as_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_save_as (HL_WINDOW (widget), HL_AFTER_NOTHING);
}

static void
export_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  HlWindow *self = HL_WINDOW (widget);
  GtkFileChooserNative *chooser;
  g_autoptr(GtkFileFilter) filter = filter_new (_("Planning summaries (*.xml)"), "*.xml", NULL);
  g_autofree char *suggested = suggested_name (self, "-summary.xml");

  chooser = gtk_file_chooser_native_new (_("Export the Planning Summary"), GTK_WINDOW (self),
                                         GTK_FILE_CHOOSER_ACTION_SAVE,
                                         _("_Export"), _("_Cancel"));
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (chooser), filter);
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (chooser), suggested);
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (chooser), TRUE);
  hl_settings_track_chooser (chooser);
  g_signal_connect_object (chooser, "response", G_CALLBACK (export_response_cb), self, 0);
  set_chooser (self, chooser);
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (chooser));
}

static void
undo_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_undo (HL_WINDOW (widget));
}

static void
redo_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_redo (HL_WINDOW (widget));
}

static void
fit_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_canvas_fit (HL_WINDOW (widget)->canvas);
}

static void
zoom_in_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_canvas_zoom_by (HL_WINDOW (widget)->canvas, HL_ZOOM_STEP);
}

static void
zoom_out_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_canvas_zoom_by (HL_WINDOW (widget)->canvas, 1.0 / HL_ZOOM_STEP);
}

static void
add_option_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_add_option (HL_WINDOW (widget));
}

static void
duplicate_option_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_duplicate_option (HL_WINDOW (widget));
}

static void
remove_option_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  hl_window_remove_option (HL_WINDOW (widget));
}

static void
show_status_action_cb (GtkWidget *widget, const char *name, GVariant *param)
{
  gtk_label_set_text (HL_WINDOW (widget)->status_label, g_variant_get_string (param, NULL));
}

void
hl_window_actions_class_init (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "win.show-status", "s", show_status_action_cb);
  gtk_widget_class_install_action (widget_class, "win.new", NULL, new_action_cb);
  gtk_widget_class_install_action (widget_class, "win.open", NULL, open_action_cb);
  gtk_widget_class_install_action (widget_class, "win.save", NULL, save_action_cb);
  gtk_widget_class_install_action (widget_class, "win.save-as", NULL, save_as_action_cb);
  gtk_widget_class_install_action (widget_class, "win.export-summary", NULL, export_action_cb);
  gtk_widget_class_install_action (widget_class, "win.undo", NULL, undo_action_cb);
  gtk_widget_class_install_action (widget_class, "win.redo", NULL, redo_action_cb);
  gtk_widget_class_install_action (widget_class, "win.fit-view", NULL, fit_action_cb);
  gtk_widget_class_install_action (widget_class, "win.zoom-in", NULL, zoom_in_action_cb);
  gtk_widget_class_install_action (widget_class, "win.zoom-out", NULL, zoom_out_action_cb);
  gtk_widget_class_install_action (widget_class, "win.add-option", NULL, add_option_action_cb);
  gtk_widget_class_install_action (widget_class, "win.duplicate-option", NULL,
                                   duplicate_option_action_cb);
  gtk_widget_class_install_action (widget_class, "win.remove-option", NULL,
                                   remove_option_action_cb);
}

/* hl-settings.c: what the window remembers between runs (hl-settings.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-settings"

#include <errno.h>
#include <math.h>
#include <glib/gi18n.h>
#include <glib/gstdio.h>

#include "hl-settings.h"
#include "hl-message.h"

#define HL_SETTINGS_DIR "hiplever"
#define HL_SETTINGS_FILE "settings.ini"
#define HL_SETTINGS_DIR_MODE 0700
/* Long enough that a resize drag or a run of clicks is one write. */
#define HL_SETTINGS_DEBOUNCE_MS 1000
/* A remembered size outside these is ignored (a different screen). */
#define HL_SETTINGS_SIZE_MIN 200
#define HL_SETTINGS_SIZE_MAX 8192
/* The ranges hl_plan_check accepts are checked again after applying. */
#define HL_SETTINGS_FRACTION_MIN 0.0
#define HL_SETTINGS_FRACTION_MAX 1.0

#define G_WINDOW "window"
#define G_UNITS "units"
#define G_FILES "files"
#define G_MODEL "model"
#define G_CATALOGUES "catalogues"

#define HL_SETTINGS_KEY "hl-settings-attached"

typedef struct {
  GKeyFile *keys;
  char *path;
  gboolean loaded;
  gboolean writable;
  gboolean dirty;
  guint save_source;
} HlSettings;

static HlSettings settings;

static const char *const bw_line_names[] = { "segmental", "midline" };
static const char *const abductor_line_names[] = { "auto", "angle" };
static const char *const mass_unit_names[] = { "kg", "lb" };

/* ---- the file ------------------------------------------------------- */

static void
settings_write (void)
{
  g_autoptr(GError) error = NULL;
  g_autofree char *dir = NULL;
  g_autofree char *data = NULL;
  gsize length = 0;

  if (!settings.writable || !settings.dirty || settings.keys == NULL)
    return;
  settings.dirty = FALSE;
  dir = g_path_get_dirname (settings.path);
  if (g_mkdir_with_parents (dir, HL_SETTINGS_DIR_MODE) != 0)
    {
      g_message ("settings not saved: cannot create %s: %s", dir, g_strerror (errno));
      return;
    }
  data = g_key_file_to_data (settings.keys, &length, NULL);
  /* g_file_set_contents writes a temporary file and renames it. */
  if (!g_file_set_contents (settings.path, data, (gssize) length, &error))
    g_message ("settings not saved to %s: %s", settings.path, error->message);
}

static gboolean
save_timeout_cb (gpointer user_data)
{
  settings.save_source = 0;
  settings_write ();
  return G_SOURCE_REMOVE;
}

static void
settings_changed (void)
{
  if (!settings.writable)
    return;
  settings.dirty = TRUE;
  if (settings.save_source == 0)
    settings.save_source = g_timeout_add (HL_SETTINGS_DEBOUNCE_MS, save_timeout_cb, NULL);
}

void
hl_settings_flush (void)
{
  if (settings.save_source != 0)
    {
      g_source_remove (settings.save_source);
      settings.save_source = 0;
    }
  settings_write ();
}

void
hl_settings_init (gboolean writable)
{
  g_autoptr(GError) error = NULL;

  settings.writable = writable;
  if (settings.loaded)
    return;
  settings.loaded = TRUE;
  settings.keys = g_key_file_new ();
  settings.path = g_build_filename (g_get_user_config_dir (), HL_SETTINGS_DIR,
                                    HL_SETTINGS_FILE, NULL);
  if (!g_key_file_load_from_file (settings.keys, settings.path, G_KEY_FILE_NONE, &error)
      && !g_error_matches (error, G_FILE_ERROR, G_FILE_ERROR_NOENT))
    {
      g_message ("settings in %s not read (%s); using the defaults",
                 settings.path, error->message);
      g_key_file_free (settings.keys);
      settings.keys = g_key_file_new ();
    }
}

/* ---- typed keys ----------------------------------------------------- */

static gboolean
get_int (const char *group, const char *key, int lo, int hi, int *out)
{
  g_autoptr(GError) error = NULL;
  int v = g_key_file_get_integer (settings.keys, group, key, &error);

  if (error != NULL || v < lo || v > hi)
    return FALSE;
  *out = v;
  return TRUE;
}

static gboolean
get_double (const char *group, const char *key, double lo, double hi, double *out)
{
  g_autoptr(GError) error = NULL;
  double v = g_key_file_get_double (settings.keys, group, key, &error);

  if (error != NULL || !isfinite (v) || v < lo || v > hi)
    return FALSE;
  *out = v;
  return TRUE;
}

/* The index of the key's value in `names`, or -1. */
static int
get_choice (const char *group, const char *key, const char *const *names, guint n)
{
  g_autofree char *v = g_key_file_get_string (settings.keys, group, key, NULL);

  for (guint i = 0; v != NULL && i < n; i++)
    if (g_str_equal (v, names[i]))
      return (int) i;
  return -1;
}

static void
set_int (const char *group, const char *key, int value)
{
  g_autoptr(GError) error = NULL;

  if (g_key_file_get_integer (settings.keys, group, key, &error) == value && error == NULL)
    return;
  g_key_file_set_integer (settings.keys, group, key, value);
  settings_changed ();
}

static void
set_string (const char *group, const char *key, const char *value)
{
  g_autofree char *old = g_key_file_get_string (settings.keys, group, key, NULL);

  if (g_strcmp0 (old, value) == 0)
    return;
  g_key_file_set_string (settings.keys, group, key, value);
  settings_changed ();
}

static void
set_boolean (const char *group, const char *key, gboolean value)
{
  g_autoptr(GError) error = NULL;
  gboolean old = g_key_file_get_boolean (settings.keys, group, key, &error);

  if (error == NULL && old == value)
    return;
  g_key_file_set_boolean (settings.keys, group, key, value);
  settings_changed ();
}

/* ---- the model defaults --------------------------------------------- */

void
hl_settings_apply_model_defaults (HlPlan *plan)
{
  g_autoptr(GError) error = NULL;
  g_autofree char *table = NULL;
  HlPlan *trial;
  HlModelChoices *m;
  HlError err;
  double v;
  int i;

  if (plan == NULL || settings.keys == NULL
      || !g_key_file_has_group (settings.keys, G_MODEL)
      || (trial = hl_plan_copy (plan)) == NULL)
    return;
  m = &trial->model;
  table = g_key_file_get_string (settings.keys, G_MODEL, "limb-table", NULL);
  if (table != NULL && hl_limb_table_from_key (table) != HL_LIMB_N)
    m->limb_table = hl_limb_table_from_key (table);
  if (get_double (G_MODEL, "limb-fraction", HL_SETTINGS_FRACTION_MIN,
                  HL_SETTINGS_FRACTION_MAX, &v))
    m->limb_fraction_custom = v;
  if ((i = get_choice (G_MODEL, "bw-line", bw_line_names, G_N_ELEMENTS (bw_line_names))) >= 0)
    m->bw_line = (HlBwLine) i;
  if ((i = get_choice (G_MODEL, "abductor-line", abductor_line_names,
                       G_N_ELEMENTS (abductor_line_names))) >= 0)
    m->abductor_line = (HlAbductorLineMode) i;
  if (get_double (G_MODEL, "abductor-angle-deg", 0.0, 90.0, &v))
    m->abductor_angle_deg = v;

  /* The core decides what is in range; a bad default changes nothing. */
  hl_error_clear (&err);
  if (hl_plan_check (trial, &err) == HL_OK)
    plan->model = trial->model;
  else
    g_message ("model defaults in %s not used: %s: %s", settings.path, err.field, err.message);
  hl_plan_free (trial);
}

static void
save_model_defaults (const HlModelChoices *m)
{
  const HlLimbTableInfo *info = hl_limb_table_info (m->limb_table);

  if (info != NULL)
    set_string (G_MODEL, "limb-table", info->key);
  g_key_file_set_double (settings.keys, G_MODEL, "limb-fraction", m->limb_fraction_custom);
  if ((guint) m->bw_line < G_N_ELEMENTS (bw_line_names))
    set_string (G_MODEL, "bw-line", bw_line_names[m->bw_line]);
  if ((guint) m->abductor_line < G_N_ELEMENTS (abductor_line_names))
    set_string (G_MODEL, "abductor-line", abductor_line_names[m->abductor_line]);
  g_key_file_set_double (settings.keys, G_MODEL, "abductor-angle-deg", m->abductor_angle_deg);
  settings_changed ();
}

static void
use_as_defaults_clicked_cb (GtkButton *button, HlDocument *document)
{
  save_model_defaults (&hl_document_get_plan (document)->model);
  hl_settings_flush ();
  hl_message_show_status (GTK_WIDGET (button),
                          settings.writable
                          ? _("The model choices of this plan are now the defaults for new plans.")
                          : _("The model choices were not saved as defaults: settings are not written in this mode."));
}

GtkWidget *
hl_settings_defaults_button_new (HlDocument *document)
{
  GtkWidget *button = gtk_button_new_with_mnemonic (_("_Use as defaults for new plans"));

  g_return_val_if_fail (HL_IS_DOCUMENT (document), NULL);
  gtk_widget_set_halign (button, GTK_ALIGN_START);
  gtk_widget_set_tooltip_text (button,
                               _("New plans start with these model choices; plans opened "
                                 "from a file keep their own."));
  gtk_widget_set_name (button, "model-defaults");
  g_signal_connect_object (button, "clicked", G_CALLBACK (use_as_defaults_clicked_cb),
                           document, 0);
  return button;
}

/* ---- the window ----------------------------------------------------- */

static void
window_state_cb (GObject *object, GParamSpec *pspec, gpointer user_data)
{
  GtkWindow *window = GTK_WINDOW (object);
  gboolean maximized = gtk_window_is_maximized (window);
  int w = 0, h = 0;

  set_boolean (G_WINDOW, "maximized", maximized);
  if (maximized)
    return;
  gtk_window_get_default_size (window, &w, &h);
  if (w >= HL_SETTINGS_SIZE_MIN && w <= HL_SETTINGS_SIZE_MAX)
    set_int (G_WINDOW, "width", w);
  if (h >= HL_SETTINGS_SIZE_MIN && h <= HL_SETTINGS_SIZE_MAX)
    set_int (G_WINDOW, "height", h);
}

static void
mass_unit_cb (GtkDropDown *drop, GParamSpec *pspec, gpointer user_data)
{
  guint unit = gtk_drop_down_get_selected (drop);

  if (unit < G_N_ELEMENTS (mass_unit_names))
    set_string (G_UNITS, "mass", mass_unit_names[unit]);
}

static gboolean
close_request_cb (GtkWindow *window, gpointer user_data)
{
  window_state_cb (G_OBJECT (window), NULL, NULL);
  hl_settings_flush ();
  return FALSE;
}

static void
destroy_cb (GtkWidget *widget, gpointer user_data)
{
  hl_settings_flush ();
}

void
hl_settings_track_mass_unit (GtkDropDown *drop)
{
  int unit;

  g_return_if_fail (GTK_IS_DROP_DOWN (drop));
  if (settings.keys == NULL)
    hl_settings_init (FALSE);
  unit = get_choice (G_UNITS, "mass", mass_unit_names, G_N_ELEMENTS (mass_unit_names));
  if (unit >= 0)
    gtk_drop_down_set_selected (drop, (guint) unit);
  g_signal_connect (drop, "notify::selected", G_CALLBACK (mass_unit_cb), NULL);
}

void
hl_settings_attach (GtkWindow *window)
{
  int w, h;
  g_autoptr(GError) error = NULL;

  g_return_if_fail (GTK_IS_WINDOW (window));
  if (settings.keys == NULL)
    hl_settings_init (FALSE);
  if (g_object_get_data (G_OBJECT (window), HL_SETTINGS_KEY) != NULL)
    return;
  g_object_set_data (G_OBJECT (window), HL_SETTINGS_KEY, GINT_TO_POINTER (1));

  if (get_int (G_WINDOW, "width", HL_SETTINGS_SIZE_MIN, HL_SETTINGS_SIZE_MAX, &w)
      && get_int (G_WINDOW, "height", HL_SETTINGS_SIZE_MIN, HL_SETTINGS_SIZE_MAX, &h))
    gtk_window_set_default_size (GTK_WINDOW (window), w, h);
  if (g_key_file_get_boolean (settings.keys, G_WINDOW, "maximized", &error) && error == NULL)
    gtk_window_maximize (GTK_WINDOW (window));

  g_signal_connect (window, "notify::default-width", G_CALLBACK (window_state_cb), NULL);
  g_signal_connect (window, "notify::default-height", G_CALLBACK (window_state_cb), NULL);
  g_signal_connect (window, "notify::maximized", G_CALLBACK (window_state_cb), NULL);
  g_signal_connect (window, "close-request", G_CALLBACK (close_request_cb), NULL);
  g_signal_connect (window, "destroy", G_CALLBACK (destroy_cb), NULL);
}

/* ---- file choosers -------------------------------------------------- */

static void
chooser_response_cb (GtkNativeDialog *dialog, int response, gpointer user_data)
{
  g_autoptr(GFile) file = NULL;
  g_autoptr(GFile) parent = NULL;
  g_autofree char *path = NULL;

  if (response != GTK_RESPONSE_ACCEPT)
    return;
  file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (dialog));
  parent = file != NULL ? g_file_get_parent (file) : NULL;
  path = parent != NULL ? g_file_get_path (parent) : NULL;
  if (path != NULL)
    set_string (G_FILES, "last-folder", path);
}

void
hl_settings_track_chooser (GtkFileChooserNative *chooser)
{
  g_autofree char *path = NULL;

  g_return_if_fail (GTK_IS_FILE_CHOOSER_NATIVE (chooser));
  if (settings.keys != NULL)
    path = g_key_file_get_string (settings.keys, G_FILES, "last-folder", NULL);
  if (path != NULL && g_file_test (path, G_FILE_TEST_IS_DIR))
    {
      g_autoptr(GFile) folder = g_file_new_for_path (path);

      gtk_file_chooser_set_current_folder (GTK_FILE_CHOOSER (chooser), folder, NULL);
    }
  hl_settings_remember_chooser (chooser);
}

void
hl_settings_remember_chooser (GtkFileChooserNative *chooser)
{
  g_return_if_fail (GTK_IS_FILE_CHOOSER_NATIVE (chooser));
  g_signal_connect (chooser, "response", G_CALLBACK (chooser_response_cb), NULL);
}

/* ---- implant catalogues ---------------------------------------------- */

char **
hl_settings_get_catalogue_paths (void)
{
  char **paths = NULL;
  if (settings.keys != NULL)
    paths = g_key_file_get_string_list (settings.keys, G_CATALOGUES, "paths", NULL, NULL);
  return paths != NULL ? paths : g_new0 (char *, 1);
}

void
hl_settings_add_catalogue_path (const char *path)
{
  if (settings.keys == NULL || path == NULL)
    return;
  g_auto(GStrv) old = hl_settings_get_catalogue_paths ();
  if (g_strv_contains ((const char *const *) old, path))
    return;
  g_autoptr(GStrvBuilder) b = g_strv_builder_new ();
  g_strv_builder_addv (b, (const char **) old);
  g_strv_builder_add (b, path);
  g_auto(GStrv) now = g_strv_builder_end (b);
  g_key_file_set_string_list (settings.keys, G_CATALOGUES, "paths",
                              (const char *const *) now, g_strv_length (now));
  settings_changed ();
}

/* hl-application.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-application"

#include <stdio.h>
#include <glib/gi18n.h>

#include "hl-application.h"
#include "hl-autosave.h"
#include "hl-resources.h"
#include "hl-plan-io.h"
#include "hl-settings.h"
#include "hl-version.h"
#include "hl-window.h"

#define HL_DEMO_FILE "demo" HL_PLAN_FILE_EXTENSION
#define HL_SIZE_MIN 200
#define HL_SIZE_MAX 8192

struct _HlApplication {
  GtkApplication parent_instance;

  char *screenshot_path;
  char *dump_path;
  char *panel;               /* side panel page to show first */
  int width;                 /* 0: the window's default */
  int height;
  gboolean benchmark_drag;
  gboolean print_results;
  gboolean print_handles;
  gint64 process_start_us;
  int exit_status;
};

G_DEFINE_FINAL_TYPE (HlApplication, hl_application, GTK_TYPE_APPLICATION)

/* The test and benchmark modes are built only with -Dtest_hooks=true. */
static const GOptionEntry option_entries[] = {
#if HL_TEST_HOOKS
  { "screenshot", 0, 0, G_OPTION_ARG_FILENAME, NULL,
    N_("Open the window, save it as a PNG image and quit"), N_("OUT.png") },
  { "size", 0, 0, G_OPTION_ARG_STRING, NULL,
    N_("Window size for --screenshot and --benchmark-drag"), N_("WxH") },
  { "dump-summary-on-exit", 0, 0, G_OPTION_ARG_FILENAME, NULL,
    N_("Write the planning summary of the open plan here on quitting (for tests)"), N_("FILE") },
  { "benchmark-drag", 0, 0, G_OPTION_ARG_NONE, NULL,
    N_("Time a scripted landmark drag and print frame times, startup time and memory"), NULL },
  { "print-results", 0, 0, G_OPTION_ARG_NONE, NULL,
    N_("Print the results table as the window formats it, as CSV, and quit"), NULL },
#endif
  { "panel", 0, 0, G_OPTION_ARG_STRING, NULL,
    N_("Side panel page to show first: case, landmarks, options, aids, radiograph or analysis"), N_("PAGE") },
  { "version", 0, 0, G_OPTION_ARG_NONE, NULL, N_("Print the version and quit"), NULL },
  { NULL }
};

int
hl_application_get_exit_status (HlApplication *self)
{
  g_return_val_if_fail (HL_IS_APPLICATION (self), 1);
  return self->exit_status;
}

void
hl_application_finish (HlApplication *self, int status)
{
  g_return_if_fail (HL_IS_APPLICATION (self));
  if (status > self->exit_status)
    self->exit_status = status;
  g_application_quit (G_APPLICATION (self));
}

static const char *const panel_names[] = { "case", "landmarks", "options", "aids", "radiograph",
                                           "analysis", NULL };

static gboolean
parse_size (const char *text, int *w, int *h)
{
  char *end = NULL;
  gint64 a, b;

  a = g_ascii_strtoll (text, &end, 10);
  if (end == text || (*end != 'x' && *end != 'X'))
    return FALSE;
  text = end + 1;
  b = g_ascii_strtoll (text, &end, 10);
  if (end == text || *end != '\0')
    return FALSE;
  if (a < HL_SIZE_MIN || a > HL_SIZE_MAX || b < HL_SIZE_MIN || b > HL_SIZE_MAX)
    return FALSE;
  *w = (int) a;
  *h = (int) b;
  return TRUE;
}

static int
hl_application_handle_local_options (GApplication *app, GVariantDict *options)
{
  HlApplication *self = HL_APPLICATION (app);
  const char *size = NULL;
  const char *env;

  if (g_variant_dict_contains (options, "version"))
    {
      printf ("hiplever %s (model %s)\n", hl_program_version (), HL_MODEL_VERSION);
      return 0;
    }
  g_variant_dict_lookup (options, "screenshot", "^ay", &self->screenshot_path);
  g_variant_dict_lookup (options, "dump-summary-on-exit", "^ay", &self->dump_path);
  g_variant_dict_lookup (options, "panel", "s", &self->panel);
  if (self->panel != NULL && !g_strv_contains (panel_names, self->panel))
    {
      g_printerr (_("hiplever: --panel '%s' is not one of case, landmarks, options, aids, radiograph, analysis\n"),
                  self->panel);
      return 2;
    }
  self->benchmark_drag = g_variant_dict_contains (options, "benchmark-drag");
  self->print_results = g_variant_dict_contains (options, "print-results");
  if (g_variant_dict_lookup (options, "size", "&s", &size)
      && !parse_size (size, &self->width, &self->height))
    {
      g_printerr (_("hiplever: --size '%s' is not WIDTHxHEIGHT with each between %d and %d pixels\n"),
                  size, HL_SIZE_MIN, HL_SIZE_MAX);
      return 2;
    }
#if HL_TEST_HOOKS
  if (self->dump_path == NULL && (env = g_getenv ("HIPLEVER_DUMP_SUMMARY")) != NULL
      && env[0] != '\0')
    self->dump_path = g_strdup (env);
  env = g_getenv ("HIPLEVER_TEST_PRINT_HANDLES");
  self->print_handles = env != NULL && g_str_equal (env, "1");
#else
  (void) env;
#endif

  /* Test and batch runs must not hand their work to a running instance. */
  if (self->screenshot_path != NULL || self->benchmark_drag || self->print_results
      || self->dump_path != NULL || self->print_handles)
    g_application_set_flags (app, g_application_get_flags (app) | G_APPLICATION_NON_UNIQUE);
  return -1;
}

static HlPlan *
load_demo (void)
{
  const char *dirs[] = { HL_PKGDATADIR, HL_SOURCE_DATADIR };
  HlPlan *plan = NULL;

  for (guint i = 0; i < G_N_ELEMENTS (dirs); i++)
    {
      g_autofree char *path = g_build_filename (dirs[i], "examples", HL_DEMO_FILE, NULL);
      HlError err;

      if (!g_file_test (path, G_FILE_TEST_EXISTS))
        continue;
      hl_error_clear (&err);
      if (hl_plan_load_file (path, &plan, &err) == HL_OK)
        return plan;
      g_warning ("the demo case %s could not be read: %s (line %d, %s)",
                 path, err.message, err.line, err.field);
    }
  /* No bundled file: the same invented geometry from the core. */
  plan = hl_plan_new ();
  if (plan != NULL)
    {
      hl_plan_set_demo_landmarks (plan);
      g_strlcpy (plan->label, _("Demo case"), sizeof plan->label);
    }
  return plan;
}

static HlWindow *
hl_application_new_window (HlApplication *self)
{
  HlWindow *window;

  /* Batch runs read the settings (units, size) but never write them. */
  hl_settings_init (!(self->benchmark_drag || self->screenshot_path != NULL
                      || self->print_results));
  window = hl_window_new (GTK_APPLICATION (self));
  hl_settings_attach (GTK_WINDOW (window));
  if (self->width > 0)
    gtk_window_set_default_size (GTK_WINDOW (window), self->width, self->height);
  if (self->dump_path != NULL)
    hl_window_set_dump_path (window, self->dump_path);
  if (self->print_handles)
    hl_window_set_print_handles (window, TRUE);
  if (self->panel != NULL)
    hl_window_show_panel (window, self->panel);
  return window;
}

static void
hl_application_start_mode (HlApplication *self, HlWindow *window)
{
  gtk_window_present (GTK_WINDOW (window));
#if HL_TEST_HOOKS
  if (self->benchmark_drag)
    hl_window_run_benchmark_drag (window, self->process_start_us);
  else if (self->screenshot_path != NULL)
    hl_window_run_screenshot (window, self->screenshot_path);
  else if (self->print_results)
    hl_window_run_print_results (window);
  else
#endif
    hl_autosave_offer_recovery (GTK_WINDOW (window));
}

static gboolean
batch_mode (HlApplication *self)
{
  return self->benchmark_drag || self->screenshot_path != NULL || self->print_results;
}

static void
hl_application_activate (GApplication *app)
{
  HlApplication *self = HL_APPLICATION (app);
  GtkWindow *active = gtk_application_get_active_window (GTK_APPLICATION (app));
  HlPlan *demo;
  HlWindow *window;

  if (active != NULL)
    {
      gtk_window_present (active);
      return;
    }
  window = hl_application_new_window (self);
  demo = load_demo ();
  if (demo != NULL)
    {
      hl_settings_apply_model_defaults (demo);
      hl_window_set_plan (window, demo);
      hl_plan_free (demo);
    }
  hl_application_start_mode (self, window);
}

static void
hl_application_open (GApplication *app, GFile **files, int n_files, const char *hint)
{
  HlApplication *self = HL_APPLICATION (app);
  int n = batch_mode (self) ? MIN (n_files, 1) : n_files;

  for (int i = 0; i < n; i++)
    {
      HlWindow *window = hl_application_new_window (self);
      HlError err;

      hl_error_clear (&err);
      if (!hl_window_load_file (window, files[i], !batch_mode (self), &err)
          && batch_mode (self))
        {
          g_autofree char *name = g_file_get_parse_name (files[i]);

          g_autofree char *msg = hl_window_format_error (&err);

          g_printerr (_("hiplever: could not open %s: %s\n"), name, msg);
          gtk_window_destroy (GTK_WINDOW (window));
          hl_application_finish (self, 1);
          return;
        }
      hl_application_start_mode (self, window);
    }
}

static void
quit_action_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  GtkApplication *app = GTK_APPLICATION (user_data);
  g_autoptr(GList) windows = g_list_copy (gtk_application_get_windows (app));

  /* Each window asks about its own unsaved changes; the application ends
   * when the last one has closed. */
  for (GList *l = windows; l != NULL; l = l->next)
    gtk_window_close (GTK_WINDOW (l->data));
}

static void
about_action_cb (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  GtkApplication *app = GTK_APPLICATION (user_data);
  g_autofree char *comments = g_strdup_printf (_("Static frontal-plane planning of the hip "
                                                 "abductor lever and joint load in total hip "
                                                 "arthroplasty (model %s).\n\n%s"),
                                               HL_MODEL_VERSION, hl_caution_text ());

  gtk_show_about_dialog (gtk_application_get_active_window (app),
                         "program-name", "hiplever",
                         "version", hl_program_version (),
                         "comments", comments,
                         "license-type", GTK_LICENSE_GPL_3_0,
                         "copyright", "© 2026 the hiplever developers",
                         NULL);
}

static const GActionEntry app_actions[] = {
  { "quit", quit_action_cb, NULL, NULL, NULL, { 0 } },
  { "about", about_action_cb, NULL, NULL, NULL, { 0 } },
};

static void
hl_application_startup (GApplication *app)
{
  static const struct {
    const char *action;
    const char *accels[3];
  } accels[] = {
    { "win.new", { "<Control>n", NULL } },
    { "win.open", { "<Control>o", NULL } },
    { "win.save", { "<Control>s", NULL } },
    { "win.save-as", { "<Control><Shift>s", NULL } },
    { "win.export-summary", { "<Control>e", NULL } },
    { "win.export-report", { "<Control><Shift>e", NULL } },
    { "win.print", { "<Control>p", NULL } },
    { "win.show-results", { "<Alt>1", NULL } },
    { "win.show-charts", { "<Alt>2", NULL } },
    { "win.undo", { "<Control>z", NULL } },
    { "win.redo", { "<Control><Shift>z", "<Control>y", NULL } },
    { "win.fit-view", { "<Control>0", NULL } },
    { "win.add-option", { "<Control><Shift>n", NULL } },
    { "app.quit", { "<Control>q", NULL } },
  };
  g_autoptr(GtkCssProvider) css = gtk_css_provider_new ();

  G_APPLICATION_CLASS (hl_application_parent_class)->startup (app);

  g_action_map_add_action_entries (G_ACTION_MAP (app), app_actions,
                                   G_N_ELEMENTS (app_actions), app);
  /* The window's shortcut controller handles the keys; these make the
   * menu show them. */
  for (guint i = 0; i < G_N_ELEMENTS (accels); i++)
    gtk_application_set_accels_for_action (GTK_APPLICATION (app), accels[i].action,
                                           accels[i].accels);

  gtk_css_provider_load_from_resource (css, "/org/hiplever/Hiplever/style.css");
  gtk_style_context_add_provider_for_display (gdk_display_get_default (),
                                              GTK_STYLE_PROVIDER (css),
                                              GTK_STYLE_PROVIDER_PRIORITY_APPLICATION);
}

static void
hl_application_finalize (GObject *object)
{
  HlApplication *self = HL_APPLICATION (object);

  g_free (self->screenshot_path);
  g_free (self->dump_path);
  g_free (self->panel);
  G_OBJECT_CLASS (hl_application_parent_class)->finalize (object);
}

static void
hl_application_class_init (HlApplicationClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GApplicationClass *app_class = G_APPLICATION_CLASS (klass);

  object_class->finalize = hl_application_finalize;
  /* Referencing the bundle keeps the linker from dropping it (and the
   * constructor that registers it) out of the static library. */
  (void) hl_ui_get_resource ();
  app_class->handle_local_options = hl_application_handle_local_options;
  app_class->startup = hl_application_startup;
  app_class->activate = hl_application_activate;
  app_class->open = hl_application_open;
}

static void
hl_application_init (HlApplication *self)
{
  g_application_add_main_option_entries (G_APPLICATION (self), option_entries);
  g_application_set_option_context_parameter_string (G_APPLICATION (self), _("[PLAN]"));
  g_application_set_option_context_summary (G_APPLICATION (self),
                                            _("Plan the hip abductor lever and joint load of a total hip arthroplasty."));
}

HlApplication *
hl_application_new (gint64 process_start_us)
{
  HlApplication *self = g_object_new (HL_TYPE_APPLICATION,
                                      "application-id", APP_ID,
                                      "flags", G_APPLICATION_HANDLES_OPEN,
                                      NULL);

  self->process_start_us = process_start_us;
  return self;
}

/* hl-autosave.c: autosave, recovery after a crash, newer files refused.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-autosave"

#include <errno.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/types.h>
#include <unistd.h>
#include <glib/gi18n.h>
#include <glib/gstdio.h>

#include "hl-autosave.h"
#include "hl-file-write.h"
#include "hl-plan-io.h"
#include "hl-version.h"
#include "hl-message.h"

#define HL_AUTOSAVE_KEY "hl-autosave"
#define HL_AUTOSAVE_GROUP "autosave"
#define HL_AUTOSAVE_DIR_MODE 0700
#define HL_BOOT_ID_PATH "/proc/sys/kernel/random/boot_id"

typedef struct {
  HlDocument *document;      /* borrowed: the window's */
  char *id;                  /* ID of ID.hlplan and ID.info */
  guint64 autosaved_revision;
  guint timer;
  gboolean has_file;         /* an autosave of this window is on disk */
  gboolean recovered;        /* the plan came from an autosave, not saved since */
  gboolean confirmed;        /* the user agreed to save it over the original */
} HlAutosave;

static HlDocument *doc_of (GtkWindow *self);

/* ---- files ---------------------------------------------------------- */

static char *
autosave_dir (void)
{
  return g_build_filename (g_get_user_data_dir (), "hiplever", "autosave", NULL);
}

static char *
autosave_path (const char *id, const char *ext)
{
  g_autofree char *dir = autosave_dir ();
  g_autofree char *name = g_strconcat (id, ext, NULL);

  return g_build_filename (dir, name, NULL);
}

static char *
read_boot_id (void)
{
  char *text = NULL;

  if (!g_file_get_contents (HL_BOOT_ID_PATH, &text, NULL, NULL))
    return NULL;
  return g_strstrip (text);
}

static void
remove_files (const char *id)
{
  g_autofree char *plan = autosave_path (id, HL_PLAN_FILE_EXTENSION);
  g_autofree char *info = autosave_path (id, HL_AUTOSAVE_INFO_EXTENSION);

  /* The plan first: an info file alone is cleaned up at the next start. */
  if (g_unlink (plan) != 0 && errno != ENOENT)
    g_warning ("could not remove the autosave %s: %s", plan, g_strerror (errno));
  if (g_unlink (info) != 0 && errno != ENOENT)
    g_warning ("could not remove the autosave %s: %s", info, g_strerror (errno));
}

static gboolean
write_info (GtkWindow *self, const char *id, GError **error)
{
  g_autoptr(GKeyFile) kf = g_key_file_new ();
  g_autoptr(GDateTime) now = g_date_time_new_now_utc ();
  g_autofree char *when = g_date_time_format_iso8601 (now);
  g_autofree char *boot = read_boot_id ();
  g_autofree char *path = autosave_path (id, HL_AUTOSAVE_INFO_EXTENSION);

  g_key_file_set_int64 (kf, HL_AUTOSAVE_GROUP, "pid", getpid ());
  if (boot != NULL)
    g_key_file_set_string (kf, HL_AUTOSAVE_GROUP, "boot-id", boot);
  if (hl_document_get_file (doc_of (self)) != NULL)
    {
      g_autofree char *original = g_file_get_path (hl_document_get_file (doc_of (self)));

      if (original != NULL)
        g_key_file_set_string (kf, HL_AUTOSAVE_GROUP, "original", original);
    }
  g_key_file_set_string (kf, HL_AUTOSAVE_GROUP, "time", when);
  g_key_file_set_string (kf, HL_AUTOSAVE_GROUP, "version", hl_program_version ());
  g_key_file_set_string (kf, HL_AUTOSAVE_GROUP, "label", hl_document_get_plan (doc_of (self))->label);
  return g_key_file_save_to_file (kf, path, error);
}

static HlAutosave *
get_state (GtkWindow *self)
{
  return g_object_get_data (G_OBJECT (self), HL_AUTOSAVE_KEY);
}

static HlDocument *
doc_of (GtkWindow *self)
{
  HlAutosave *a = get_state (self);

  return a != NULL ? a->document : NULL;
}

static void
forget (GtkWindow *self, HlAutosave *a)
{
  if (a->has_file)
    remove_files (a->id);
  a->has_file = FALSE;
  a->recovered = FALSE;
  a->confirmed = FALSE;
  a->autosaved_revision = hl_document_get_revision (doc_of (self));
}

/* ---- the timer ------------------------------------------------------ */

static gboolean
autosave_tick_cb (gpointer user_data)
{
  GtkWindow *self = user_data;
  HlAutosave *a = get_state (self);
  g_autofree char *dir = NULL;
  g_autofree char *plan_path = NULL;
  g_autoptr(GError) error = NULL;
  HlError err;

  if (a == NULL)
    return G_SOURCE_CONTINUE;
  if (!hl_document_is_modified (doc_of (self)))
    {
      /* Back at the saved state (by undo): nothing left to lose. */
      if (a->has_file && !a->recovered)
        forget (self, a);
      return G_SOURCE_CONTINUE;
    }
  if (a->has_file && a->autosaved_revision == hl_document_get_revision (doc_of (self)))
    return G_SOURCE_CONTINUE;

  dir = autosave_dir ();
  if (g_mkdir_with_parents (dir, HL_AUTOSAVE_DIR_MODE) != 0)
    {
      g_debug ("no autosave folder %s: %s", dir, g_strerror (errno));
      return G_SOURCE_CONTINUE;
    }
  if (!write_info (self, a->id, &error))
    {
      g_debug ("autosave info not written: %s", error->message);
      return G_SOURCE_CONTINUE;
    }
  plan_path = autosave_path (a->id, HL_PLAN_FILE_EXTENSION);
  hl_error_clear (&err);
  if (hl_plan_save_file (hl_document_get_plan (doc_of (self)), plan_path, &err) != HL_OK)
    {
      /* The last good autosave stays; see hl-autosave.h. */
      g_debug ("plan not autosaved: %s", err.message);
      return G_SOURCE_CONTINUE;
    }
  a->has_file = TRUE;
  a->autosaved_revision = hl_document_get_revision (doc_of (self));
  return G_SOURCE_CONTINUE;
}

static guint
interval_seconds (void)
{
  const char *env = g_getenv (HL_AUTOSAVE_ENV);
  guint64 seconds = 0;

  if (env == NULL || env[0] == '\0')
    return HL_AUTOSAVE_DEFAULT_SECONDS;
  if (!g_ascii_string_to_unsigned (env, 10, 1, HL_AUTOSAVE_MAX_SECONDS, &seconds, NULL))
    {
      g_warning ("%s='%s' is not a whole number of seconds from 1 to %d; autosaving every %d s",
                 HL_AUTOSAVE_ENV, env, HL_AUTOSAVE_MAX_SECONDS, HL_AUTOSAVE_DEFAULT_SECONDS);
      return HL_AUTOSAVE_DEFAULT_SECONDS;
    }
  return (guint) seconds;
}

static void
autosave_free (gpointer data)
{
  HlAutosave *a = data;

  g_clear_handle_id (&a->timer, g_source_remove);
  g_free (a->id);
  g_free (a);
}

void
hl_autosave_attach (GtkWindow *self, HlDocument *document)
{
  static guint windows;
  HlAutosave *a = g_new0 (HlAutosave, 1);

  a->document = document;
  a->id = g_strdup_printf ("%d-%u-%" G_GINT64_FORMAT, (int) getpid (), ++windows,
                           g_get_real_time ());
  a->autosaved_revision = hl_document_get_revision (document);
  a->timer = g_timeout_add_seconds (interval_seconds (), autosave_tick_cb, self);
  g_object_set_data_full (G_OBJECT (self), HL_AUTOSAVE_KEY, a, autosave_free);
}

void
hl_autosave_saved (GtkWindow *self)
{
  HlAutosave *a = get_state (self);

  if (a != NULL)
    forget (self, a);
}

void
hl_autosave_closed (GtkWindow *self)
{
  HlAutosave *a = get_state (self);

  if (a != NULL)
    {
      forget (self, a);
      g_clear_handle_id (&a->timer, g_source_remove);
    }
}

void
hl_autosave_plan_replaced (GtkWindow *self)
{
  hl_autosave_saved (self);
}

gboolean
hl_autosave_is_recovered (GtkWindow *self)
{
  HlAutosave *a = get_state (self);

  return a != NULL && a->recovered;
}

/* ---- newer files ---------------------------------------------------- */

gboolean
hl_autosave_target_is_newer (const char *path, HlError *err)
{
  HlPlan *existing = NULL;
  HlError local;

  if (!g_file_test (path, G_FILE_TEST_IS_REGULAR))
    return FALSE;
  hl_error_clear (&local);
  if (hl_plan_load_file (path, &existing, &local) == HL_OK)
    {
      hl_plan_free (existing);
      return FALSE;
    }
  if (local.status != HL_ERR_VERSION)
    return FALSE;
  hl_error_set (err, HL_ERR_VERSION, path,
                _("“%s” was written by a newer version of hiplever (%s). "
                  "It is not overwritten; save the plan under another name."),
                path, local.message);
  return TRUE;
}

/* ---- saving a recovered plan ---------------------------------------- */

static void
confirm_response_cb (GtkDialog *dialog, int response, GtkWindow *self)
{
  HlAutosave *a = get_state (self);

  gtk_window_destroy (GTK_WINDOW (dialog));
  if (response != GTK_RESPONSE_ACCEPT || a == NULL)
    return;
  a->confirmed = TRUE;
  gtk_widget_activate_action (GTK_WIDGET (self), "win.save", NULL);
}

gboolean
hl_autosave_confirm_save (GtkWindow *self)
{
  HlAutosave *a = get_state (self);
  g_autofree char *name = NULL;
  g_autofree char *secondary = NULL;
  GtkWidget *dialog;

  if (a == NULL || !a->recovered || a->confirmed || hl_document_get_file (doc_of (self)) == NULL)
    return FALSE;
  name = g_file_get_parse_name (hl_document_get_file (doc_of (self)));
  char *backup = hl_backup_path (name);     /* a long name's backup is shortened */
  secondary = g_strdup_printf (_("The file holds the version saved before the program ended; "
                                 "the recovered plan has the later changes. The file's "
                                 "present version is kept as “%s”."),
                               backup != NULL ? backup : name);
  free (backup);
  dialog = gtk_message_dialog_new (GTK_WINDOW (self),
                                   GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                   GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                   _("Save the recovered plan over “%s”?"), name);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (dialog), "%s", secondary);
  gtk_dialog_add_buttons (GTK_DIALOG (dialog),
                          _("_Cancel"), GTK_RESPONSE_CANCEL,
                          _("_Replace"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_ACCEPT);
  gtk_window_set_title (GTK_WINDOW (dialog), _("Save recovered plan"));
  g_signal_connect_object (dialog, "response", G_CALLBACK (confirm_response_cb), self, 0);
  gtk_window_present (GTK_WINDOW (dialog));
  return TRUE;
}

/* ---- recovery ------------------------------------------------------- */

/* Alive: the same boot, and a process of that PID that is not a zombie
 * (a killed child stays one until its parent reaps it). */
static gboolean
owner_alive (gint64 pid, const char *boot_id)
{
  g_autofree char *boot = read_boot_id ();
  g_autofree char *stat_path = NULL;
  g_autofree char *stat = NULL;
  const char *paren;

  if (pid <= 0 || pid > G_MAXINT)
    return FALSE;
  if (boot != NULL && boot_id != NULL && strcmp (boot, boot_id) != 0)
    return FALSE;
  if (pid == getpid ())
    return TRUE;
  stat_path = g_strdup_printf ("/proc/%" G_GINT64_FORMAT "/stat", pid);
  if (g_file_get_contents (stat_path, &stat, NULL, NULL))
    {
      paren = strrchr (stat, ')');
      return paren == NULL || (paren[1] == ' ' && paren[2] != 'Z' && paren[2] != 'X');
    }
  if (g_file_test ("/proc/self/stat", G_FILE_TEST_EXISTS))
    return FALSE;
  return kill ((pid_t) pid, 0) == 0 || errno == EPERM;
}

typedef struct {
  HlDocument *document;      /* borrowed: the window's */
  char *id;
  char *original;            /* NULL: never saved under a name */
  char *label;
  char *when;
} HlOrphan;

static void
orphan_free (HlOrphan *o)
{
  g_free (o->id);
  g_free (o->original);
  g_free (o->label);
  g_free (o->when);
  g_free (o);
}

G_DEFINE_AUTOPTR_CLEANUP_FUNC (HlOrphan, orphan_free)

/* The newest autosave whose owner is gone; *n_others counts the rest. */
static HlOrphan *
find_orphan (guint *n_others)
{
  g_autofree char *dir_path = autosave_dir ();
  g_autoptr(GDir) dir = g_dir_open (dir_path, 0, NULL);
  HlOrphan *best = NULL;
  const char *name;

  *n_others = 0;
  if (dir == NULL)
    return NULL;
  while ((name = g_dir_read_name (dir)) != NULL)
    {
      g_autoptr(GKeyFile) kf = g_key_file_new ();
      g_autofree char *path = NULL;
      g_autofree char *id = NULL;
      g_autofree char *plan = NULL;
      g_autofree char *boot = NULL;
      g_autofree char *when = NULL;
      gint64 pid;

      if (!g_str_has_suffix (name, HL_AUTOSAVE_INFO_EXTENSION))
        continue;
      id = g_strndup (name, strlen (name) - strlen (HL_AUTOSAVE_INFO_EXTENSION));
      path = g_build_filename (dir_path, name, NULL);
      if (!g_key_file_load_from_file (kf, path, G_KEY_FILE_NONE, NULL))
        continue;
      pid = g_key_file_get_int64 (kf, HL_AUTOSAVE_GROUP, "pid", NULL);
      boot = g_key_file_get_string (kf, HL_AUTOSAVE_GROUP, "boot-id", NULL);
      if (owner_alive (pid, boot))
        continue;
      plan = autosave_path (id, HL_PLAN_FILE_EXTENSION);
      if (!g_file_test (plan, G_FILE_TEST_IS_REGULAR))
        {
          /* The owner ended before its first plan was written. */
          remove_files (id);
          continue;
        }
      when = g_key_file_get_string (kf, HL_AUTOSAVE_GROUP, "time", NULL);
      if (when == NULL)
        when = g_strdup ("");
      if (best != NULL && g_strcmp0 (best->when, when) >= 0)
        {
          (*n_others)++;
          continue;
        }
      if (best != NULL)
        {
          (*n_others)++;
          orphan_free (best);
        }
      best = g_new0 (HlOrphan, 1);
      best->id = g_steal_pointer (&id);
      best->when = g_steal_pointer (&when);
      best->original = g_key_file_get_string (kf, HL_AUTOSAVE_GROUP, "original", NULL);
      best->label = g_key_file_get_string (kf, HL_AUTOSAVE_GROUP, "label", NULL);
    }
  return best;
}

static void
recover (GtkWindow *self, HlOrphan *o)
{
  HlAutosave *a = get_state (self);
  g_autofree char *plan_path = autosave_path (o->id, HL_PLAN_FILE_EXTENSION);
  g_autoptr(GFile) original = o->original != NULL ? g_file_new_for_path (o->original) : NULL;
  g_autoptr(GError) error = NULL;
  HlPlan *plan = NULL;
  HlError err;

  hl_error_clear (&err);
  if (a == NULL)
    return;
  if (hl_plan_load_file (plan_path, &plan, &err) != HL_OK)
    {
      g_autofree char *msg = hl_document_format_error (&err);
      g_autofree char *secondary = g_strdup_printf (_("%s\n\nThe autosaved file is kept: %s"),
                                                    msg, plan_path);

      hl_message_show_error (GTK_WIDGET (self), _("The unsaved changes could not be recovered"), secondary);
      return;
    }
  if (!hl_document_replace (doc_of (self), plan, original))
    {
      hl_plan_free (plan);
      return;
    }
  hl_plan_free (plan);
  hl_autosave_plan_replaced (self);

  /* This window owns the autosave now, so no other start offers it. */
  g_free (a->id);
  a->id = g_strdup (o->id);
  if (!write_info (self, a->id, &error))
    g_warning ("could not take over the autosave %s: %s", a->id, error->message);
  a->has_file = TRUE;
  a->recovered = TRUE;
  a->confirmed = FALSE;
  a->autosaved_revision = hl_document_get_revision (doc_of (self));
  /* Modified: no revision of this window was ever saved. */
  hl_document_mark_unsaved (doc_of (self));
}

typedef struct {
  GtkWindow *self;
  HlOrphan *orphan;
  int response;
} HlRecoveryAnswer;

static gboolean
recovery_answer_idle_cb (gpointer user_data)
{
  HlRecoveryAnswer *answer = user_data;

  switch (answer->response)
    {
    case GTK_RESPONSE_ACCEPT:
      recover (answer->self, answer->orphan);
      break;
    case GTK_RESPONSE_REJECT:
      remove_files (answer->orphan->id);
      break;
    default:
      /* Later: the files stay for the next start. */
      break;
    }
  g_object_unref (answer->self);
  orphan_free (answer->orphan);
  g_free (answer);
  return G_SOURCE_REMOVE;
}

static void
recovery_response_cb (GtkDialog *dialog, int response, GtkWindow *self)
{
  HlRecoveryAnswer *answer = g_new0 (HlRecoveryAnswer, 1);

  answer->self = g_object_ref (self);
  answer->orphan = g_object_steal_data (G_OBJECT (dialog), "hl-orphan");
  answer->response = response;
  gtk_window_destroy (GTK_WINDOW (dialog));
  if (answer->orphan == NULL)
    {
      g_object_unref (answer->self);
      g_free (answer);
      return;
    }
  g_idle_add (recovery_answer_idle_cb, answer);
}

void
hl_autosave_offer_recovery (GtkWindow *self)
{
  static gboolean offered;
  g_autoptr(HlOrphan) orphan = NULL;
  g_autoptr(GString) secondary = g_string_new (NULL);
  guint n_others = 0;
  GtkWidget *dialog;
  const char *label;

  if (offered)
    return;
  offered = TRUE;
  orphan = find_orphan (&n_others);
  if (orphan == NULL)
    return;

  label = orphan->label != NULL && orphan->label[0] != '\0' ? orphan->label : _("Untitled case");
  g_string_append_printf (secondary,
                          _("hiplever ended without saving the changes (autosaved %s UTC)."),
                          orphan->when);
  g_string_append (secondary, "\n");
  if (orphan->original != NULL)
    g_string_append_printf (secondary, _("Its file: %s"), orphan->original);
  else
    g_string_append (secondary, _("The plan was never saved under a name."));
  g_string_append (secondary, "\n\n");
  g_string_append (secondary,
                   _("Recover opens the changes as an unsaved plan; Discard deletes them; "
                     "Later keeps them for the next start."));
  if (n_others > 0)
    {
      g_string_append (secondary, "\n");
      g_string_append_printf (secondary,
                              ngettext ("%u more autosaved plan will be offered at the next start.",
                                        "%u more autosaved plans will be offered at the next start.",
                                        n_others),
                              n_others);
    }

  dialog = gtk_message_dialog_new (GTK_WINDOW (self),
                                   GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                   GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                   _("Recover the unsaved changes to “%s”?"), label);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (dialog), "%s", secondary->str);
  gtk_dialog_add_buttons (GTK_DIALOG (dialog),
                          _("_Later"), GTK_RESPONSE_CANCEL,
                          _("_Discard"), GTK_RESPONSE_REJECT,
                          _("_Recover"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_ACCEPT);
  gtk_window_set_title (GTK_WINDOW (dialog), _("Recover unsaved changes"));
  g_object_set_data_full (G_OBJECT (dialog), "hl-orphan", g_steal_pointer (&orphan),
                          (GDestroyNotify) orphan_free);
  g_signal_connect_object (dialog, "response", G_CALLBACK (recovery_response_cb), self, 0);
  gtk_window_present (GTK_WINDOW (dialog));
}

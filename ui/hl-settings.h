/* hl-settings.h: what the window remembers between runs.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A small key file, g_get_user_config_dir()/hiplever/settings.ini (no
 * GSettings: that needs an installed compiled schema).  Groups and keys:
 *
 *   [window]  width, height (px, the size when not maximised), maximized
 *   [units]   mass = kg | lb          (the Case page's mass unit)
 *   [files]   last-folder             (of the open, save and export choosers)
 *   [model]   limb-table (a table key, e.g. dempster-winter), limb-fraction,
 *             bw-line = segmental | midline, abductor-line = auto | angle,
 *             abductor-angle-deg      (defaults for new plans)
 *
 * Read once at startup, written (atomically) a second after a change and
 * when a window closes.  A missing, unreadable or corrupt file means the
 * built-in defaults, with one g_message; keys that are missing or out of
 * range are ignored one by one.  Batch runs (--screenshot, --print-results,
 * --benchmark-drag) read the file but never write it.
 *
 * Model defaults are set only by the Case page's "Use as defaults for new
 * plans" button under the Model choices: changing a choice in a plan
 * changes that plan only.  They apply to the plan a window starts with when
 * no file is opened; a plan opened from a file keeps its own values.
 */
#pragma once

#include <gtk/gtk.h>

#include "hl-document.h"
#include "hl-plan.h"

G_BEGIN_DECLS

/* Loads the file (once); `writable` FALSE for batch runs. */
void hl_settings_init (gboolean writable);

/* Restores the size and maximised state of a new window and keeps them
 * up to date. */
void hl_settings_attach (GtkWindow *window);
/* Restores the mass unit (kg or lb) into the Case page's dropdown and keeps
 * it up to date. */
void hl_settings_track_mass_unit (GtkDropDown *drop);
/* The "Use as defaults for new plans" button: saves the document's model
 * choices as the defaults. */
GtkWidget *hl_settings_defaults_button_new (HlDocument *document);

/* Copies the saved model defaults (those present and valid) into a plan
 * that is not from a file. */
void hl_settings_apply_model_defaults (HlPlan *plan);

/* Starts the chooser in the last folder used and records the folder of the
 * file chosen.  Call before connecting the caller's own "response"
 * handler; a later gtk_file_chooser_set_file still wins. */
void hl_settings_track_chooser (GtkFileChooserNative *chooser);
/* Only records the folder of what the user chooses: for choosers that
 * start at a file of their own (Save As of a plan that has a file). */
void hl_settings_remember_chooser (GtkFileChooserNative *chooser);

/* Writes pending changes now (on quitting). */
void hl_settings_flush (void);

/* The implant catalogue files the user added, in the order added
 * ([catalogues] paths); NULL-terminated, g_strfreev. */
char **hl_settings_get_catalogue_paths (void);
/* Remembers one more (a path already there is not added twice). */
void hl_settings_add_catalogue_path (const char *path);

G_END_DECLS

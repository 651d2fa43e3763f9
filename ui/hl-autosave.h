/* hl-autosave.h: no lost work in the window: autosave, recovery after a
 * crash, and plan files the program must not overwrite.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * While a window has unsaved changes, its plan is written every
 * HL_AUTOSAVE_DEFAULT_SECONDS (test hook: HIPLEVER_AUTOSAVE_SECONDS) to
 * $XDG_DATA_HOME/hiplever/autosave/ID.hlplan, atomically, with ID.info, a
 * key file holding the original path, the time, the program version and
 * the owning process (its PID and the boot it ran in).  The info file is
 * written first, so a plan file never lacks its owner.
 *
 * A plan the core refuses to write (hl_plan_save_file checks it as it
 * would for a real save) is not autosaved: the last good autosave stays,
 * nothing is said, and the next tick tries again.
 *
 * The files go on a clean save, a clean close (also when the user chose
 * Discard), when another plan replaces this one, and when the user
 * discards a recovery.  An autosave whose owner is gone (a crash, a kill,
 * a reboot) is offered at the next start; one whose owner still runs is
 * left to it.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_AUTOSAVE_DEFAULT_SECONDS 30
#define HL_AUTOSAVE_MAX_SECONDS 3600
#define HL_AUTOSAVE_ENV "HIPLEVER_AUTOSAVE_SECONDS"
#define HL_AUTOSAVE_INFO_EXTENSION ".info"

/* Starts the timer for the window's document (from hl_window_init). */
void hl_autosave_attach (GtkWindow *self, HlDocument *document);
/* The plan was saved under its name: the autosave goes. */
void hl_autosave_saved (GtkWindow *self);
/* The window closes after its unsaved-changes guard: the autosave goes. */
void hl_autosave_closed (GtkWindow *self);
/* Another plan replaced the one in the window. */
void hl_autosave_plan_replaced (GtkWindow *self);
/* The plan came from a recovered autosave and is not saved yet. */
gboolean hl_autosave_is_recovered (GtkWindow *self);
/* Before Save writes a recovered plan over its original file: TRUE when
 * a question is shown, and Save runs again if the user confirms. */
gboolean hl_autosave_confirm_save (GtkWindow *self);
/* Once per process, at the first window: offers the newest autosave whose
 * owner is gone (Recover, Discard or Later). */
void hl_autosave_offer_recovery (GtkWindow *self);
/* TRUE (err filled with HL_ERR_VERSION) when `path` is a plan file of a
 * format newer than this program writes: it is never overwritten. */
gboolean hl_autosave_target_is_newer (const char *path, HlError *err);

G_END_DECLS

/* hl-application.h: the GtkApplication, its command line and modes.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

G_BEGIN_DECLS

#define HL_TYPE_APPLICATION (hl_application_get_type ())
G_DECLARE_FINAL_TYPE (HlApplication, hl_application, HL, APPLICATION, GtkApplication)

/* `process_start_us`: g_get_monotonic_time() at the start of main, for the
 * startup figure when /proc is not there. */
HlApplication *hl_application_new (gint64 process_start_us);

/* Quits with an exit status (the test and batch modes). */
void hl_application_finish (HlApplication *self, int status);
int  hl_application_get_exit_status (HlApplication *self);

G_END_DECLS

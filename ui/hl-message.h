/* hl-message.h: errors and status lines from any widget of a window.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Pages and views say things through these, not through the window's
 * private struct: the error dialog is parented to the widget's window, the
 * status line is the window's "win.show-status" action (a string).
 */
#pragma once

#include <gtk/gtk.h>

G_BEGIN_DECLS

/* A modal error dialog over the window that holds `widget`. */
void hl_message_show_error  (GtkWidget *widget, const char *primary,
                             const char *secondary);
/* Shows `text` in the status line of the window that holds `widget`. */
void hl_message_show_status (GtkWidget *widget, const char *text);

G_END_DECLS

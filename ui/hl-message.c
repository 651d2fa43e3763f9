/* hl-message.c: errors and status lines from any widget of a window.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-message"

#include <glib/gi18n.h>

#include "hl-message.h"

static void
error_dialog_response_cb (GtkDialog *dialog, int response, gpointer user_data)
{
  gtk_window_destroy (GTK_WINDOW (dialog));
}

void
hl_message_show_error (GtkWidget *widget, const char *primary, const char *secondary)
{
  GtkRoot *root = widget != NULL ? gtk_widget_get_root (widget) : NULL;
  GtkWidget *dialog;

  dialog = gtk_message_dialog_new (GTK_IS_WINDOW (root) ? GTK_WINDOW (root) : NULL,
                                   GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                   GTK_MESSAGE_ERROR, GTK_BUTTONS_CLOSE,
                                   "%s", primary);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (dialog),
                                            "%s", secondary);
  gtk_window_set_title (GTK_WINDOW (dialog), _("Error"));
  g_signal_connect (dialog, "response",
                    G_CALLBACK (error_dialog_response_cb), NULL);
  gtk_window_present (GTK_WINDOW (dialog));
}

void
hl_message_show_status (GtkWidget *widget, const char *text)
{
  g_return_if_fail (GTK_IS_WIDGET (widget));
  gtk_widget_activate_action (widget, "win.show-status", "s", text);
}

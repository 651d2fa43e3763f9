/* hl-a11y.h: test hooks that read the window as assistive technology and
 * the tests do: the texts of the visible labels, and the controls that a
 * screen reader could not name.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * HIPLEVER_TEST_PRINT_LABELS=1 prints "LABEL <text>" for every visible
 * GtkLabel (line breaks as spaces) before the --screenshot picture is taken.
 * HIPLEVER_TEST_CHECK_A11Y=1 prints "UNLABELLED <type> <id or -> in <parent type>" for every
 * visible focusable control with neither an accessible label, a
 * labelled-by relation nor text of its own, then "A11Y <n> unlabelled"; the
 * --screenshot run then exits with status 1 when n > 0.  The check reads
 * the widgets' accessible properties, which GTK keeps only with an
 * accessibility backend: run it with GTK_A11Y=test (or with an AT-SPI
 * bus), not with GTK_A11Y=none.
 */
#pragma once

#include <gtk/gtk.h>

G_BEGIN_DECLS

/* Gives every spin button, entry and drop-down without an accessible name
 * a labelled-by relation to its caption: in a grid the label left of it in
 * its row (or above it), in a box the label just before it. */
void  hl_a11y_label_controls (GtkWidget *root);

void  hl_a11y_print_labels (GtkWidget *root);
guint hl_a11y_check        (GtkWidget *root);
int   hl_a11y_run_test_hooks (GtkWidget *root);

G_END_DECLS

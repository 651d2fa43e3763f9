/* hl-template-panel.h: the implants of the selected option.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Under the option's parameters in the side panel: the catalogue, cup and
 * stem families and "Template this option" for a manual option; for a
 * templated one the cup size, liner, stem size, version and head length
 * as lists, the live readouts (templating.md section 3), the cup and stem
 * suggestions with their reasons and an Apply button each, and the ranking
 * of the implant combinations (hl-fit.h, the same as `hiplever-cli fit`)
 * with an Apply button per row, computed off the main thread.  Every
 * change is one undo step through the document; nothing is applied
 * without the user.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

GtkWidget *hl_template_panel_new (HlDocument *document);
/* Loads the catalogue files the settings remember into the registry
 * (hl-template-shape.h), once per process; files that fail are reported
 * in the panel's banner.  Adds the action "add-catalogue" (a file chooser:
 * the catalogue is loaded, checked and remembered) to `actions`. */
void hl_template_panel_setup_catalogues (GtkWidget *panel, GtkWindow *window,
                                         GActionMap *actions);
/* What the core reported of the plan's catalogues when it opened
 * (hl_catalogue_registry_resolve); NULL clears the banner. */
void hl_template_panel_set_warnings (GtkWidget *panel, const char *warnings);
/* TRUE while a ranking runs (tests wait for it). */
gboolean hl_template_panel_get_busy (GtkWidget *panel);
/* Rows of the ranking shown, and how long the last ranking took (ms). */
guint hl_template_panel_get_n_ranked (GtkWidget *panel);
double hl_template_panel_get_rank_ms (GtkWidget *panel);
/* Applies ranked row `rank` (1-based) as the button would; FALSE when
 * there is none. */
gboolean hl_template_panel_apply_rank (GtkWidget *panel, guint rank);

/* Called (on the main thread) whenever the panel's layout changed: a
 * ranking arrived.  For the test hooks. */
void hl_template_panel_set_changed_func (GtkWidget *panel, GFunc func, gpointer data);
/* Calls func (name, widget, data) for the controls tests drive:
 * "template-place", "template-manual", "template-rank-N" (Apply of row N). */
typedef void (*HlTemplateControlFunc) (const char *name, GtkWidget *widget, gpointer data);
void hl_template_panel_foreach_control (GtkWidget *panel, HlTemplateControlFunc func,
                                        gpointer data);

G_END_DECLS

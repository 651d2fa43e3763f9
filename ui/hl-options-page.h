/* hl-options-page.h: the side panel's "Options" page: the list of
 * reconstruction options, the selected one's name and parameters (changes
 * against the native hip) and, under them, its implants
 * (hl-template-panel.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Selecting a row selects that option in the document; the name and the
 * parameters edit the selected option (each change one undo step, a run
 * of changes to one control one step); the page follows the document's
 * "changed" signal.  The Add, Duplicate and Remove buttons only name the
 * window's actions (win.add-option, ...): the window owns them.  A
 * templated option's numbers come from its implants: shown, not edited.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_TYPE_OPTIONS_PAGE (hl_options_page_get_type ())
G_DECLARE_FINAL_TYPE (HlOptionsPage, hl_options_page, HL, OPTIONS_PAGE, GtkBox)

/* Edits and follows `document` (borrowed: it must outlive the page); adds
 * the implant panel for it under the parameters. */
void hl_options_page_set_document (HlOptionsPage *self, HlDocument *document);

/* The implant panel (hl-template-panel.h), NULL before set_document. */
GtkWidget *hl_options_page_get_template_panel (HlOptionsPage *self);

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): "WIDGET
 * add-option", "duplicate-option", "remove-option" and "option-name" with
 * x y in the window's surface coordinates. */
void hl_options_page_print_handles (HlOptionsPage *self);

G_END_DECLS

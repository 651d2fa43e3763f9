/* hl-case-page.h: the side panel's "Case" page: the case label, body mass
 * (kg or lb), operated side, the model choices and the abductor capacity.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Its controls edit the document's plan (each change one undo step, a run
 * of changes to one field one step) and follow the document's "changed"
 * signal.  The mass unit is a view setting (kept in the settings), not part
 * of the plan: the plan holds kilograms.  Changing the side mirrors the
 * landmarks on the schematic and only relabels them over a radiograph;
 * the page then emits "side-changed" so the window can refit the view.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_TYPE_CASE_PAGE (hl_case_page_get_type ())
G_DECLARE_FINAL_TYPE (HlCasePage, hl_case_page, HL, CASE_PAGE, GtkBox)

/* Edits and follows `document` (borrowed: it must outlive the page). */
void hl_case_page_set_document (HlCasePage *self, HlDocument *document);

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): "WIDGET mass-spin",
 * "WIDGET mass-unit" and "WIDGET side" with x y in the window's surface
 * coordinates. */
void hl_case_page_print_handles (HlCasePage *self);

G_END_DECLS

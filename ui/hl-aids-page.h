/* hl-aids-page.h: the side panel's "Aids" page: the cane and carried loads.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Its controls edit the document's plan (each change one undo step, a run
 * of changes to one spin button one step) and follow the document's
 * "changed" signal.  The cane's unit converts the value, so changing the
 * unit changes no force.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_TYPE_AIDS_PAGE (hl_aids_page_get_type ())
G_DECLARE_FINAL_TYPE (HlAidsPage, hl_aids_page, HL, AIDS_PAGE, GtkBox)

/* Edits and follows `document` (borrowed: it must outlive the page). */
void hl_aids_page_set_document (HlAidsPage *self, HlDocument *document);

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): "WIDGET cane-check
 * x y" in the window's surface coordinates. */
void hl_aids_page_print_handles (HlAidsPage *self);

G_END_DECLS

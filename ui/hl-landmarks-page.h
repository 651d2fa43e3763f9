/* hl-landmarks-page.h: the side panel's "Landmarks" page: the landmark
 * table with exact coordinates in plan millimetres and whether each
 * landmark is placed.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Its controls edit the document's plan (each change one undo step, a run
 * of changes to one coordinate one step) and follow the document's
 * "changed" signal.  The selected row is the "selected-landmark" property
 * (an HlLandmarkId, or -1 for none): the window binds it to the
 * schematic's selection.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_TYPE_LANDMARKS_PAGE (hl_landmarks_page_get_type ())
G_DECLARE_FINAL_TYPE (HlLandmarksPage, hl_landmarks_page, HL, LANDMARKS_PAGE, GtkBox)

/* Edits and follows `document` (borrowed: it must outlive the page). */
void hl_landmarks_page_set_document (HlLandmarksPage *self, HlDocument *document);

/* The landmark of the selected row, -1 for none. */
int  hl_landmarks_page_get_selected_landmark (HlLandmarksPage *self);
/* Selects the row of `id` (-1 or out of range: none) and shows its hint. */
void hl_landmarks_page_set_selected_landmark (HlLandmarksPage *self, int id);

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): "WIDGET lm-x-KEY"
 * and "WIDGET lm-y-KEY" for every landmark, with x y in the window's
 * surface coordinates. */
void hl_landmarks_page_print_handles (HlLandmarksPage *self);

G_END_DECLS

/* hl-ui-util.h: small pieces the side panel's pages share.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A page holds an HlPageLink (the document it edits and follows, and a
 * counter that is above zero while its controls are set from the plan, so
 * that setting them is not taken for an edit).  Spin buttons that edit
 * one double of the plan each are described by a table of HlPlanSpin and
 * bound once; every change is one undo step of the document (a run of
 * changes to one spin button one step).
 */
#pragma once

#include <stddef.h>
#include <gtk/gtk.h>
#include "hl-document.h"

G_BEGIN_DECLS

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): prints
 * "WIDGET <name> <x> <y>", the centre of `widget` in its window's surface
 * coordinates; nothing when it is not shown. */
void hl_ui_print_widget (const char *name, GtkWidget *widget);

/* Shows `value` unless it is not finite or shown already (so that no
 * "value-changed" is emitted for nothing). */
void hl_ui_set_spin (GtkSpinButton *spin, double value);

/* Configures a spin button of a template as gtk_spin_button_new_with_range
 * makes one: the range, `step`, the digits `step` has, numeric input; it
 * is then as wide as that makes it (set other digits after). */
void hl_ui_spin_set_range (GtkSpinButton *spin, double lower, double upper, double step);

/* A page's link to its document. */
typedef struct {
  HlDocument *document;      /* borrowed: outlives the page */
  guint syncing;             /* > 0 while the controls are set from the plan */
} HlPageLink;

/* The plan to change as one undo step (`field` non-NULL coalesces repeated
 * edits of one control; NULL starts a new step), or NULL while the page
 * syncs, before it has a document, or when the step could not be recorded
 * (the document said so).  End with hl_document_end_edit. */
HlPlan *hl_page_link_begin_edit (HlPageLink *link, const char *field);

/* A spin button that edits one double of the plan directly. */
typedef struct {
  size_t widget_offset;      /* of the GtkSpinButton * in the page's struct */
  const char *field;         /* undo coalescing key */
  size_t plan_offset;        /* of the double in HlPlan */
  double lower, upper, step, page;
} HlPlanSpin;

/* The spin button of `spin` in the page struct `page`. */
GtkSpinButton *hl_plan_spin_widget (gpointer page, const HlPlanSpin *spin);
/* The double `spin` edits in `plan`. */
double hl_plan_spin_value (const HlPlan *plan, const HlPlanSpin *spin);

/* Sets each spin button's range and increments, turns its text's own undo
 * off (Ctrl+Z in a number field means the plan's undo) and connects it:
 * a change writes the plan through `link` (HL_DOCUMENT_CHANGED_VALUES).
 * `spins` and `link` must outlive the page. */
void hl_plan_spins_bind (gpointer page, HlPageLink *link,
                         const HlPlanSpin *spins, guint n);
/* Shows the plan's values in the spin buttons (the caller syncs). */
void hl_plan_spins_sync (gpointer page, const HlPlanSpin *spins, guint n,
                         const HlPlan *plan);

G_END_DECLS

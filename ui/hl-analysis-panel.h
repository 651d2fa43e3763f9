/* hl-analysis-panel.h: the side panel's "Analysis" page.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The page answers the inverse questions of the core (hl-inverse.h) for
 * the selected option, or the native hip when none is selected, each in
 * one plain sentence with an "Apply" button that makes the answer part of
 * the plan as one undoable edit:
 *
 *  - the femoral offset change that restores the native abductor moment
 *    arm, and the one that restores global offset: the selected option's
 *    femoral offset change;
 *  - the cane force that brings the joint load down to the target: the
 *    plan's cane, in the opposite hand, in the plan's cane unit;
 *  - the largest load in either hand or on the midline that keeps the
 *    joint load under the target: that load of the plan;
 *  - the lean that brings abductor demand within capacity: the plan's
 *    lateral trunk lean.
 *
 * The joint-load target (x body weight, default 2.0 as the command line
 * and the report use) is a setting of the page, not of the plan.  Below
 * the answers: the capacity use of native and every option (demand over
 * capacity in %), the capacity presets of hl-capacity.h as a dropdown that
 * sets the plan's capacity torque (an undoable edit) and the assumption
 * the presets rest on.
 *
 * The page follows its document's "changed" signal and reads the model
 * the document prepared; while hidden it waits until it is shown.  Every
 * number is computed by the core; the page only shows it.
 *
 * Signal "shown-changed": what the page shows moved (answers recomputed
 * for a new target, the page scrolled), for the test hooks.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-answer.h"
#include "hl-document.h"

G_BEGIN_DECLS

#define HL_TYPE_ANALYSIS_PANEL (hl_analysis_panel_get_type ())
G_DECLARE_FINAL_TYPE (HlAnalysisPanel, hl_analysis_panel, HL, ANALYSIS_PANEL, GtkBox)

/* The page for `document` (borrowed: it must outlive the page), scrolled
 * within itself; it goes into the side panel as it is.  Its template is
 * ui/hl-analysis-panel.ui. */
GtkWidget *hl_analysis_panel_new (HlDocument *document);

/* The joint-load target of the page, x body weight (the default when
 * `self` is NULL). */
double hl_analysis_panel_get_target_bw (HlAnalysisPanel *self);

/* Makes answer `question` part of the plan as one undoable edit, as its
 * Apply button does; FALSE (nothing changed) when it has no answer that
 * can be applied. */
gboolean hl_analysis_panel_apply (HlAnalysisPanel *self, HlQuestion question);

/* For the handle printer (HIPLEVER_TEST_PRINT_HANDLES): WIDGET lines for
 * analysis-target, capacity-preset and apply-<question key>, and one line
 * per question
 *   ANSWER <key> <ok|not-reachable|not-converged|none> <value> <applicable>
 * with the value to full precision (nan without an answer). */
void hl_analysis_panel_print_handles (HlAnalysisPanel *self);

G_END_DECLS

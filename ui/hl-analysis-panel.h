/* hl-analysis-panel.h: the side panel's "Analysis" page, and the analysis
 * the window shows elsewhere (ranges in the results, the charts).
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
 * On every plan change the page also runs the Monte Carlo of the plan's
 * uncertainty settings (hl-uncertainty.h) for the 5-95% ranges of the
 * results table and passes the change to the charts view.  Everything is
 * computed by the core; the page only shows it.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-answer.h"
#include "hl-window.h"

G_BEGIN_DECLS

#define HL_TYPE_ANALYSIS_PANEL (hl_analysis_panel_get_type ())
G_DECLARE_FINAL_TYPE (HlAnalysisPanel, hl_analysis_panel, HL, ANALYSIS_PANEL, GtkBox)

/* Builds the page, adds it to the side panel as "analysis" and connects
 * the charts view; called once from the window's init. */
void hl_analysis_attach (HlWindow *window);

/* From hl_window_plan_edited: the ranges, the answers, the capacity use
 * and the charts follow the plan. */
void hl_analysis_plan_edited (HlWindow *window);

/* The joint-load target of the page, x body weight. */
double hl_analysis_get_target_bw (HlWindow *window);

/* Makes answer `question` part of the plan as one undoable edit, as its
 * Apply button does; FALSE (nothing changed) when it has no answer that
 * can be applied. */
gboolean hl_analysis_apply (HlWindow *window, HlQuestion question);

/* From the handle printer (HIPLEVER_TEST_PRINT_HANDLES): WIDGET lines for
 * page-analysis, lower-results, lower-charts, chart-kind, analysis-target,
 * capacity-preset and apply-<question key>; "CHARTS <kind> <runs of the
 * core> <ok|error>"; "AREA charts-view x y width height" while the charts
 * are shown; and one line per question
 *   ANSWER <key> <ok|not-reachable|not-converged|none> <value> <applicable>
 * with the value to full precision (nan without an answer). */
void hl_analysis_print_handles (HlWindow *window);

G_END_DECLS

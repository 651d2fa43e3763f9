/* hl-canvas.h: the schematic, a drawing widget with draggable landmarks.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The canvas never edits the plan itself and never computes mechanics: it
 * draws the plan it is given (with the forces the core returns) and reports
 * what the user does with signals; the window applies the edit to the plan
 * and calls hl_canvas_plan_changed().
 *
 * Signals:
 *  - "landmark-drag-begin" (int landmark_id): a drag (or a keyboard nudge)
 *    starts; the window records one undo step here.
 *  - "landmark-moved" (int landmark_id, double x_mm, double y_mm): the new
 *    plan-frame position, during a drag and for each nudge.
 *  - "landmark-drag-end" (int landmark_id, gboolean cancelled): the drag is
 *    over; when cancelled (Escape) "landmark-moved" has already been
 *    emitted with the position from before the drag.
 * A keyboard nudge (arrow keys: 0.5 mm, Shift: 5 mm) emits begin, moved
 * and end in a row, so each nudge is one undo step.
 *
 * Properties: "selected-landmark" (int, -1 = none), "selected-option"
 * (int, -1 = native only).
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-plan.h"

G_BEGIN_DECLS

#define HL_TYPE_CANVAS (hl_canvas_get_type ())
G_DECLARE_FINAL_TYPE (HlCanvas, hl_canvas, HL, CANVAS, GtkWidget)

GtkWidget *hl_canvas_new (void);

/* The plan is borrowed: it must outlive the canvas or be replaced. */
void hl_canvas_set_plan (HlCanvas *self, const HlPlan *plan);
/* Call after every edit of the plan: recomputes and redraws. */
void hl_canvas_plan_changed (HlCanvas *self);

void hl_canvas_set_selected_option (HlCanvas *self, int index);
int  hl_canvas_get_selected_option (HlCanvas *self);
void hl_canvas_set_selected_landmark (HlCanvas *self, int landmark_id);
int  hl_canvas_get_selected_landmark (HlCanvas *self);

void hl_canvas_fit (HlCanvas *self);
/* Widget coordinates of a plan-frame point in the current view; FALSE
 * before the first layout.  For the GUI tests and the drag benchmark. */
gboolean hl_canvas_plan_to_widget (HlCanvas *self, double x_mm, double y_mm,
                                   double *x, double *y);
void hl_canvas_zoom_by (HlCanvas *self, double factor);

G_END_DECLS

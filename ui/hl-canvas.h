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
 *  - "plan-clicked" (double x_mm, double y_mm): in click-placement mode
 *    only, a primary click (press and release without a drag) at this
 *    plan-frame point; calibration and guided placement use it.  In that
 *    mode no landmark can be dragged (a drag pans).
 *
 * The option's implant template (hl-render-template.h) is edited the same
 * way: the canvas reports, the window (hl-template-tool.c) edits.
 *  - "template-drag-begin" (int part), "template-dragged" (int part,
 *    double from_x_mm, double from_y_mm, double to_x_mm, double to_y_mm:
 *    the press and the pointer now, plan frame), "template-drag-end"
 *    (int part, gboolean cancelled);
 *  - "template-nudge" (int part, double dx, double dy): arrow keys on a
 *    selected template handle (0.5, Shift 5: mm for the cup and stem,
 *    dy in degrees for the inclination);
 *  - "template-step-size" (int part, int step): Page Up (+1) or Page
 *    Down (-1) on the selected cup or stem.
 *
 * Properties: "selected-landmark" (int, -1 = none), "selected-option"
 * (int, -1 = native only), "selected-template" (int, HlTemplatePart or -1).
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"
#include "hl-plan.h"
#include "hl-underlay.h"

G_BEGIN_DECLS

#define HL_TYPE_CANVAS (hl_canvas_get_type ())
G_DECLARE_FINAL_TYPE (HlCanvas, hl_canvas, HL, CANVAS, GtkWidget)

GtkWidget *hl_canvas_new (void);

/* Draws the document's plan with its results (solved once per edit by the
 * document, never again here) and follows its "changed" signal: the
 * plan, the selected option, a new plan (fitted).  Borrowed: it must
 * outlive the canvas. */
void hl_canvas_set_document (HlCanvas *self, HlDocument *document);
/* Without a document: the plan is borrowed (it must outlive the canvas or
 * be replaced) and solved here. */
void hl_canvas_set_plan (HlCanvas *self, const HlPlan *plan);
/* Call after every edit of the plan: recomputes and redraws. */
void hl_canvas_plan_changed (HlCanvas *self);

void hl_canvas_set_selected_option (HlCanvas *self, int index);
int  hl_canvas_get_selected_option (HlCanvas *self);
void hl_canvas_set_selected_landmark (HlCanvas *self, int landmark_id);
int  hl_canvas_get_selected_landmark (HlCanvas *self);

/* The implant template's selected part (HlTemplatePart,
 * hl-render-template.h; -1 none).  Selecting one clears the selected
 * landmark and the other way round. */
void hl_canvas_set_selected_template (HlCanvas *self, int part);
int  hl_canvas_get_selected_template (HlCanvas *self);
/* Widget coordinates of a template handle; FALSE when it is not drawn. */
gboolean hl_canvas_template_handle_to_widget (HlCanvas *self, int part,
                                              double *x, double *y);

void hl_canvas_fit (HlCanvas *self);
/* Widget coordinates of a plan-frame point in the current view; FALSE
 * before the first layout.  For the GUI tests and the drag benchmark. */
gboolean hl_canvas_plan_to_widget (HlCanvas *self, double x_mm, double y_mm,
                                   double *x, double *y);
void hl_canvas_zoom_by (HlCanvas *self, double factor);

/* The radiograph drawn under the landmarks, placed by the plan's
 * <radiograph> and calibration (hl_image_placement) with its opacity;
 * borrowed, NULL for none.  Call again (or hl_canvas_plan_changed) after
 * changing its adjustments. */
void hl_canvas_set_underlay (HlCanvas *self, HlUnderlay *underlay);
/* Draws the schematic bones (TRUE, the default) or only the forces and
 * handles over the radiograph. */
void hl_canvas_set_schematic_visible (HlCanvas *self, gboolean visible);
/* Click-placement mode: clicks emit "plan-clicked", landmarks do not drag,
 * the pointer is a crosshair. */
void hl_canvas_set_click_placement (HlCanvas *self, gboolean enabled);
gboolean hl_canvas_get_click_placement (HlCanvas *self);
/* Moves the drawing by (dx, dy) px (the benchmark's pan). */
void hl_canvas_pan_by (HlCanvas *self, double dx, double dy);
/* The view (px per mm, offsets), for tests that compute screen points. */
void hl_canvas_get_view (HlCanvas *self, double *scale, double *tx, double *ty);
/* How many frames were drawn over the kept picture of the schematic's base
 * layer (the radiograph, the midline and the pelvis) instead of drawing it
 * again: for the drag benchmark. */
guint hl_canvas_get_base_reuses (HlCanvas *self);

G_END_DECLS

/* hl-charts-view.h: the charts in the window's lower area.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Joint reaction force and abductor force side by side (or one above the
 * other when the view is narrow), against one thing a surgeon can change:
 * the femoral offset change of each option, the cane force, or a load in
 * either hand, chosen in the dropdown above the charts.  One curve per
 * option plus the native hip, the plan's current setting marked, and
 * optionally the Monte Carlo 5-95% bands.
 *
 * The numbers come from the core through hl_chart_data_new, run once per
 * plan change (at once while the view is shown, else when it is next
 * shown) in a worker thread on a copy of the plan, never per frame and
 * never on the main thread: the drawing keeps the last numbers until the
 * new ones come, a computation that an edit overtakes is cancelled and
 * its numbers dropped.  Drawing (hl_chart_draw) computes nothing.
 * "computed" is emitted each time new numbers are shown.
 * Colours follow the widget's own colour, so the charts suit light and
 * dark themes.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-chart.h"
#include "hl-document.h"
#include "hl-plan.h"

G_BEGIN_DECLS

#define HL_TYPE_CHARTS_VIEW (hl_charts_view_get_type ())
G_DECLARE_FINAL_TYPE (HlChartsView, hl_charts_view, HL, CHARTS_VIEW, GtkWidget)

GtkWidget  *hl_charts_view_new             (void);
/* The plan charted, borrowed: it must outlive the view or be replaced. */
void        hl_charts_view_set_plan        (HlChartsView *self, const HlPlan *plan);
/* Charts the document's plan and follows its changes.  Borrowed. */
void        hl_charts_view_set_document    (HlChartsView *self, HlDocument *document);
/* TRUE while numbers for the plan as it is now are still to come. */
gboolean    hl_charts_view_get_busy        (HlChartsView *self);
/* The plan changed: recompute now when shown, else when next shown. */
void        hl_charts_view_plan_changed    (HlChartsView *self);
void        hl_charts_view_set_kind        (HlChartsView *self, HlChartKind kind);
HlChartKind hl_charts_view_get_kind        (HlChartsView *self);
void        hl_charts_view_set_show_bands  (HlChartsView *self, gboolean show);
gboolean    hl_charts_view_get_show_bands  (HlChartsView *self);
/* How often the core has been run, and why the last run failed (NULL when
 * it did not): for tests and the benchmark. */
guint       hl_charts_view_get_compute_count (HlChartsView *self);
const char *hl_charts_view_get_error       (HlChartsView *self);
/* The dropdown that picks the chart, for the handle printer. */
GtkWidget  *hl_charts_view_get_kind_drop   (HlChartsView *self);

G_END_DECLS

/* hl-window-private.h: shared by the hl-window*.c files.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "hl-aids-page.h"
#include "hl-analysis-panel.h"
#include "hl-canvas.h"
#include "hl-case-page.h"
#include "hl-document.h"
#include "hl-landmarks-page.h"
#include "hl-options-page.h"
#include "hl-radiograph-page.h"
#include "hl-results.h"
#include "hl-ui-types.h"

G_BEGIN_DECLS

/* What to do once the unsaved-changes question has been answered. */
typedef enum {
  HL_AFTER_NOTHING,
  HL_AFTER_CLOSE,
  HL_AFTER_OPEN,
  HL_AFTER_NEW,
} HlAfterGuard;

struct _HlWindow {
  GtkApplicationWindow parent_instance;

  /* template widgets */
  GtkToggleButton *caution_toggle;
  GtkRevealer *caution_revealer;
  GtkLabel *caution_short_label;
  GtkLabel *caution_full_label;
  HlCanvas *canvas;
  HlResults *results;
  GtkStack *panel_stack;
  GtkLabel *status_label;
  /* case page */
  HlCasePage *case_page;
  /* landmarks page */
  HlLandmarksPage *landmarks_page;
  /* options page */
  HlOptionsPage *options_page;
  /* aids page */
  HlAidsPage *aids_page;

  /* owned */
  HlDocument *document;      /* the plan, its history, results, analysis */
  char *dump_path;

  /* borrowed */
  GtkNativeDialog *chooser;
  GtkWidget *guard_dialog;
  HlAfterGuard after_guard;

  /* state */
  gboolean disposing;        /* template children are going away */
  gboolean close_confirmed;
  gboolean skip_close_guard;
  gboolean print_handles;
  gboolean handles_dirty;
  guint handles_printed;

  /* the analysis (hl-analysis-panel.c, hl-charts-view.c, hl-export.c) */
  GtkStack *lower_stack;     /* "results" and "charts" under the schematic */
  GtkWidget *charts_view;    /* HlChartsView */
  HlAnalysisPanel *analysis_panel;
  HlRadiographPage *radiograph_page;
};

/* hl-window.c */
int hl_window_selected_option (HlWindow *self);
void hl_window_replace_plan (HlWindow *self, const HlPlan *plan, GFile *file);
void hl_window_update_title (HlWindow *self);
void hl_window_update_actions (HlWindow *self);
gboolean hl_window_is_modified (HlWindow *self);
void hl_window_select_option (HlWindow *self, int index);
void hl_window_show_error (HlWindow *self, const char *primary,
                           const char *secondary);

/* hl-window-actions.c */
void hl_window_actions_class_init (GtkWidgetClass *widget_class);
void hl_window_undo (HlWindow *self);
void hl_window_redo (HlWindow *self);
void hl_window_add_option (HlWindow *self);
void hl_window_duplicate_option (HlWindow *self);
void hl_window_remove_option (HlWindow *self);
gboolean hl_window_close_request (HlWindow *self);

/* hl-window-test.c */
void hl_window_print_handles (HlWindow *self);
void hl_window_start_print_handles (HlWindow *self);
void hl_window_write_dump (HlWindow *self);

G_END_DECLS

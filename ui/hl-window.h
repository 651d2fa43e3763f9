/* hl-window.h: the main window, one plan.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-plan.h"
#include "hl-ui-types.h"

G_BEGIN_DECLS

#define HL_TYPE_WINDOW (hl_window_get_type ())
G_DECLARE_FINAL_TYPE (HlWindow, hl_window, HL, WINDOW, GtkApplicationWindow)

HlWindow *hl_window_new (GtkApplication *app);

/* Loads a plan file; on failure says why in a dialog when `report` is set,
 * fills `err` and leaves the current plan as it was. */
gboolean hl_window_load_file (HlWindow *self, GFile *file, gboolean report,
                              HlError *err);
/* Takes a plan that is not tied to a file (the bundled demo): saving asks
 * for a name. */
void hl_window_set_plan (HlWindow *self, const HlPlan *plan);
const HlPlan *hl_window_get_plan (HlWindow *self);
/* The document the window shows: the plan, its history, its results. */
HlDocument *hl_window_get_document (HlWindow *self);
/* An error in plain words with its line and field, for messages. */
char *hl_window_format_error (const HlError *err);

/* Shows a page of the side panel: "case", "landmarks", "options" or
 * "aids"; FALSE for any other name. */
gboolean hl_window_show_panel (HlWindow *self, const char *name);
/* Writes the planning summary of the plan here when the window closes. */
void hl_window_set_dump_path (HlWindow *self, const char *path);
/* Closes without asking about unsaved changes (test and batch modes). */
void hl_window_set_skip_close_guard (HlWindow *self, gboolean skip);
/* Prints the screen positions of the landmark handles and of the
 * controls the GUI tests drive, after each frame that moved them. */
void hl_window_set_print_handles (HlWindow *self, gboolean print);

/* Test and benchmark modes (hl-window-test.c); each quits the
 * application when done, with a non-zero exit status on failure. */
void hl_window_run_screenshot (HlWindow *self, const char *png_path);
void hl_window_run_print_results (HlWindow *self);
void hl_window_run_benchmark_drag (HlWindow *self, gint64 process_start_us);

G_END_DECLS

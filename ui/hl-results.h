/* hl-results.h: the results table, native and every option side by side.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Columns are native and each reconstruction option; rows are the
 * plain-word flags (one short line each; a click on them shows the full
 * sentences), leg length and global offset against the other side,
 * then the quantities the core computes, each with its change against
 * native in per cent.  A column whose solve failed shows the error in
 * plain words where its numbers would be.  Numbers follow the process
 * locale.  The table scrolls itself: the option names stay on top and the
 * quantity names on the left while it scrolls.
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-document.h"
#include "hl-solve.h"
#include "hl-uncertainty.h"

G_BEGIN_DECLS

#define HL_TYPE_RESULTS (hl_results_get_type ())
G_DECLARE_FINAL_TYPE (HlResults, hl_results, HL, RESULTS, GtkWidget)

GtkWidget *hl_results_new (void);
/* Shows the document's results, ranges and selected option and follows
 * its "changed" signal.  Borrowed: it must outlive the table. */
void hl_results_set_document (HlResults *self, HlDocument *document);
/* `solved` holds 1 + plan->n_options columns; copied as text, not kept. */
void hl_results_update (HlResults *self, const HlPlan *plan,
                        const HlSolved *solved, size_t n);
/* The Monte Carlo 5-95% ranges of abductor force and joint load, and the
 * share of samples with a lower joint load than native, shown right under
 * those figures; ranges[0] is native.  NULL, or a count that is not the
 * table's, hides them.  `note` (may be NULL) is shown under the table: the
 * samples and errors behind the ranges, or why there are none.  Copied. */
void hl_results_set_ranges (HlResults *self, const HlMcSummary *ranges,
                            size_t n, const char *note);
/* The ranges shown, as CSV lines in the layout of hl_results_format_csv
 * (rows abductor-force-bw-p05, abductor-force-bw-p95,
 * joint-reaction-force-bw-p05, joint-reaction-force-bw-p95 and
 * lower-jrf-than-native in %), each number as the window shows it; empty
 * when none are shown.  For tests. */
char *hl_results_format_ranges_csv (HlResults *self);
/* Signal "view-changed": the table scrolled, or a column's full flag
 * sentences were shown or hidden. */

/* The body's scrolling in `orientation`: the option names follow its
 * horizontal one, the quantity names its vertical one. */
GtkAdjustment *hl_results_get_adjustment (HlResults *self, GtkOrientation orientation);
/* For the GUI tests (HIPLEVER_TEST_PRINT_HANDLES=1): prints, in window
 * surface coordinates, "RESULTS scroll H V", "RESULTS-AREA body|header|names
 * X Y W H", "RESULTS-HEADER C X Y W H" (option names), "RESULTS-CELL C ..."
 * (each column's first cell), "RESULTS-NAME ROW ..." and "RESULTS-ROW ROW
 * ..." (each shown row's name and its place in the body),
 * "WIDGET results-body X Y", "WIDGET results-why-C X Y" (a flagged
 * column's flags, a button) and "RESULTS-WHY C LINES" (its full sentences,
 * while shown). */
void hl_results_print_handles (HlResults *self);
/* Highlights an option's column (-1: none). */
void hl_results_set_selected_option (HlResults *self, int index);

/* The table as CSV text, each number formatted exactly as the window shows
 * it (without the change in per cent): a header "quantity,unit,native,..."
 * then one line per quantity, a "flags" line of flag keys and an "error"
 * line with the message of each column that could not be solved (whose
 * other cells are empty).  For tests. */
char *hl_results_format_csv (const HlPlan *plan, const HlSolved *solved,
                             size_t n);

G_END_DECLS

/* hl-export.h: the window's report, figure, sweep-table and print actions.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Window actions (in the header-bar menu, with the accelerators of
 * hl-application.c):
 *
 *  win.export-report   "Export Report (PDF)…": the A4 report (two pages or more) of
 *                      hl-report.h, with the analysis page's joint-load
 *                      target and the selected option in the schematic,
 *                      the radiograph under it unless the chooser's choice
 *                      "Radiograph under the schematic" is cleared;
 *  win.export-figure   "Export Figure (SVG/PNG)…": a small dialog for the
 *                      size (default 1600 x 1200, or the slide and
 *                      half-slide presets of `hiplever-cli figure`), the
 *                      option drawn and the radiograph under it (a check
 *                      box, on when the plan has one), then the file; the
 *                      format follows the extension;
 *  win.export-sweeps   "Export Sweeps (CSV)…": the report's four chart
 *                      sweeps in one table, the caution first as "# "
 *                      comment lines;
 *  win.print           "Print…": the report through GtkPrintOperation, each
 *                      A4 page scaled to the printable area.
 *
 * Files are chosen with GtkFileChooserNative, written atomically
 * (hl_write_file_atomic), and every failure is said in a dialog with the
 * file and the reason.  The radiograph is the one the window shows
 * (decoded once, off the main thread, by the Radiograph page); only while
 * that still loads is it read from its file for the export.  A radiograph
 * that is missing or has changed since the plan was saved is left out and
 * the status line says so.  Every
 * export carries the caution of hl-version.h.
 *
 * Test hook (environment): HIPLEVER_TEST_PRINT_TO=FILE.pdf makes "Print…"
 * run the same print operation without its dialog, exporting the pages
 * to FILE (GTK_PRINT_OPERATION_ACTION_EXPORT).
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-analysis-panel.h"
#include "hl-document.h"
#include "hl-plan.h"
#include "hl-radiograph-page.h"

G_BEGIN_DECLS

/* The figure's size when the dialog opens, px (SVG: pt). */
#define HL_EXPORT_FIGURE_WIDTH_DEFAULT 1600
#define HL_EXPORT_FIGURE_HEIGHT_DEFAULT 1200

/* Adds the actions to the window, for the document it shows; called once
 * from its init. */
void hl_export_attach (GtkApplicationWindow *window, HlDocument *document,
                       HlAnalysisPanel *analysis, HlRadiographPage *radiograph);

/* The sweep table as written by "Export Sweeps (CSV)…": the caution and
 * the case as leading "# " lines, then hl_report_sweeps_csv's table.
 * NULL with err set when the plan cannot be solved. */
char *hl_export_sweeps_csv (const HlPlan *plan, HlError *err);

/* `file` with `ext` (".pdf") added unless its name already ends with it
 * (core's hl_path_with_extension: the one rule for every file the window
 * writes); a new reference. */
GFile *hl_export_with_extension (GFile *file, const char *ext);

G_END_DECLS

/* hl-report.h: the A4 PDF report, figures and sweep tables (cairo only).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The report is built in two steps, as the charts are: hl_report_new has
 * the core compute its content (core/hl-report-data.h: results, Monte
 * Carlo ranges, inverse answers, chart series, every table cell and line
 * as text) and sets it on A4 pages with pango; hl_report_draw_page then
 * draws any page into any cairo context in points of an A4 page (a PDF
 * surface, a print context, a preview), as often as needed.  Nothing here
 * computes mechanics or formats a number.
 *
 * Page 1: the case, the caution, the inputs, the results table with the
 * changes against native and the 5-95% ranges, leg length and offset
 * against the other hip in words, the flags in plain words, the capacity
 * use and the inverse answers.  Then, on a page of its own: the schematic
 * with the force vectors, the charts, the assumptions and the sources.
 * Every option is shown: content that does not fit a page goes on the
 * next one (type shrinks a little first when that keeps the report to two
 * pages).
 *
 * Every file is written atomically (rendered to memory, then
 * hl_write_file_atomic), so a failure never leaves a partial file.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include <cairo.h>

#include "hl-plan.h"
#include "hl-render.h"
#include "hl-report-data.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* A4 in PostScript points (210 x 297 mm, rounded to whole points). */
#define HL_REPORT_PAGE_WIDTH_PT 595.0
#define HL_REPORT_PAGE_HEIGHT_PT 842.0

typedef struct HlReport HlReport;

/* Runs the core for the report.  NULL with err set when the plan cannot be
 * solved, a setting is out of range, or memory runs out. */
HlReport *hl_report_new (const HlPlan *plan, const HlReportSettings *settings,
                         HlError *err);
/* The same, with the radiograph already in memory (the window's, shown
 * with the plan's window and level): used under the schematic when the
 * settings ask for it, borrowed, never read from its file again.  NULL
 * `underlay`: as hl_report_new. */
HlReport *hl_report_new_with_underlay (const HlPlan *plan, const HlReportSettings *settings,
                                       HlUnderlay *underlay, HlError *err);
void hl_report_free (HlReport *report);

/* The number of pages: 2 for most plans, more when the content needs
 * them (many options). */
int hl_report_n_pages (const HlReport *report);
/* The content the report shows (the core's). */
const HlReportData *hl_report_data (const HlReport *report);

/* Why the radiograph asked for (settings.underlay) is not under the
 * schematic: the plan's image is missing, changed, unreadable or cannot be
 * placed.  NULL when it is there, or was not asked for, or the plan has
 * none.  The report is complete without it; the caller says so. */
const HlError *hl_report_underlay_note (const HlReport *report);

/* Draws page `page` (0-based) with its origin at the top left, in points
 * of an A4 page; the caller scales for anything else. */
void hl_report_draw_page (const HlReport *report, cairo_t *cr, int page);
/* The layout of page 2's schematic, in points of its box (width x
 * height): for the tests. */
void hl_report_figure_layout (const HlReport *report, HlRenderLayout *layout,
                              double *width, double *height);

/* Every text box page `page` draws, in points of the page (the text's
 * logical extents and its first bytes): for the tests, which check that no
 * two boxes on a page intersect.  g_free the array. */
typedef struct {
  double x, y, w, h;
  char text[48];
} HlReportTextBox;
HlReportTextBox *hl_report_page_text_boxes (HlReport *report, int page, size_t *n);

/* The whole report as a PDF in memory; *out is malloc'd. */
HlStatus hl_report_pdf_to_buffer (const HlReport *report, unsigned char **out,
                                  size_t *size, HlError *err);
/* hl_report_new, the PDF, and an atomic write to path. */
HlStatus hl_report_save_pdf (const HlPlan *plan, const HlReportSettings *settings,
                             const char *path, HlError *err);

/* ---- Figures ---------------------------------------------------------- */

typedef enum {
  HL_FIGURE_FORMAT_PNG = 0,
  HL_FIGURE_FORMAT_SVG,
} HlFigureFormat;

/* The format from a file name's extension (.png, .svg, any case); false
 * for any other name. */
bool hl_figure_format_from_path (const char *path, HlFigureFormat *format);

/* The schematic with the force vectors of option `option_index` (-1 =
 * native), width x height px (SVG: points), light style, with the caution;
 * the size within HL_FIGURE_SIZE_MIN..MAX of hl-render.h.  *out is malloc'd. */
HlStatus hl_figure_to_buffer (const HlPlan *plan, int option_index, int width,
                              int height, HlFigureFormat format,
                              unsigned char **out, size_t *size, HlError *err);
/* The same written atomically to path, the format from its extension. */
HlStatus hl_figure_save (const HlPlan *plan, int option_index, int width,
                         int height, const char *path, HlError *err);
/* Both at a preset's size and text (HL_RENDER_PRESET_AUTO: width x height
 * with text and markers scaled to it), with the radiograph `underlay`
 * under the drawing (NULL: none; hl_underlay_for_plan, borrowed). */
HlStatus hl_figure_to_buffer_preset (const HlPlan *plan, int option_index, int width,
                                     int height, HlRenderPreset preset,
                                     HlUnderlay *underlay, HlFigureFormat format,
                                     unsigned char **out, size_t *size, HlError *err);
HlStatus hl_figure_save_preset (const HlPlan *plan, int option_index, int width,
                                int height, HlRenderPreset preset, HlUnderlay *underlay,
                                const char *path, HlError *err);

/* ---- Sweep tables ----------------------------------------------------- */

/* The report's four chart sweeps in one CSV table:
 * hl_report_data_sweeps_csv of its content. */
HlStatus hl_report_sweeps_csv (const HlReport *report, char **out, size_t *size,
                               HlError *err);

/* Seconds the last hl_report_new took to run the core (for benchmarks). */
double hl_report_compute_seconds (const HlReport *report);

#ifdef __cplusplus
}
#endif

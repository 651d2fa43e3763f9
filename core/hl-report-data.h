/* hl-report-data.h: the content of the planning report, computed by the
 * core and handed to render/hl-report.c to lay out and draw.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * hl_report_data_new runs the core once for a report (the results of
 * native and every option, the Monte Carlo ranges, the inverse answers,
 * the chart series and bands) and turns everything the report shows into
 * text: lines and paragraphs in plain words, and tables of cells already
 * formatted for people (HL_DECIMALS_* through the result-field table).
 * The drawing side only chooses fonts, widths and pages; it formats no
 * number and computes nothing.
 *
 * Every option of the plan is in every table and list: nothing is cut to
 * fit a page (the drawing side adds pages instead).
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "hl-chart-data.h"
#include "hl-inverse.h"
#include "hl-plan.h"
#include "hl-solve.h"
#include "hl-uncertainty.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The joint-load target of the inverse questions, x body weight: our
 * default, a round figure below the 2.1-2.8 BW measured in static
 * single-leg stance (Kotzar et al. 1991, J Orthop Res 9:621-633). */
#define HL_REPORT_TARGET_JRF_BW_DEFAULT 2.0
#define HL_REPORT_TARGET_JRF_BW_MIN 0.5
#define HL_REPORT_TARGET_JRF_BW_MAX 10.0

/* Points per chart curve in the report. */
#define HL_REPORT_CHART_STEPS 81

typedef struct {
  const char *date;        /* shown as the report's date; NULL: today (UTC) */
  double target_jrf_bw;    /* for the cane and load questions */
  bool uncertainty;        /* run the Monte Carlo: ranges and chart bands */
  int figure_option;       /* option in the schematic: -1 native, or an index;
                            * HL_REPORT_FIGURE_FIRST: the first option if any */
  bool underlay;           /* the radiograph under the schematic when the plan
                            * has one (default true; render/hl-underlay.h) */
} HlReportSettings;

#define HL_REPORT_FIGURE_FIRST (-2)

void hl_report_settings_init (HlReportSettings *settings);

/* A table of text cells: header_rows rows of column titles, then the body.
 * cells[row * n_cols + col] is never NULL (an empty cell is ""). */
typedef struct {
  int n_cols;
  int n_rows;              /* including the header rows */
  int header_rows;
  char **cells;
  bool *numeric;           /* per column: numbers (set flush right) */
  bool *emphasis;          /* per row: the headline row (set bold) */
} HlReportTable;

const char *hl_report_table_cell (const HlReportTable *table, int row, int col);

/* A list of lines of text. */
typedef struct {
  size_t n;
  char **items;
} HlReportLines;

/* One answer to an inverse question, of case `row` (0 native, 1 + i
 * option i). */
typedef struct {
  size_t row;
  HlInverseAnswer answer;
  char *text;
} HlReportAnswer;

typedef struct {
  HlPlan *plan;              /* the report's own copy */
  HlReportSettings settings; /* settings.date NULL: see date */
  char date[32];
  size_t n_cases;            /* 1 + options: native, then every option */
  char **case_names;         /* n_cases */
  HlResult *results;         /* n_cases */
  HlModel model;

  /* Page one, in order. */
  char *title;
  char *case_line;           /* "Case: ..." */
  char *meta_line;           /* side, mass, date, versions */
  const char *caution_title;
  const char *caution_text;
  char *inputs_heading;
  HlReportLines inputs_left, inputs_right;
  char *landmarks_caption;
  HlReportTable landmarks;   /* one row per landmark; render may set it in columns */
  char *landmarks_note;
  char *options_caption;
  HlReportTable options;     /* no body rows without options */
  char *options_none;        /* NULL when there are options */
  char *implants_caption;    /* NULL without templated options */
  HlReportTable implants;
  char *against_heading;     /* leg length and offset against the other hip */
  HlReportLines against;     /* "<case>: operated leg 4.0 mm shorter ...; global offset ..." */
  char *results_heading;
  HlReportTable results_table; /* column 0 the quantity, then one column per case */
  char *mc_note;             /* NULL without the Monte Carlo */
  char *flags_heading;
  HlReportLines flags;       /* one line per case, then the cane note if any */
  char *capacity_heading;
  char *capacity_text;
  const char *capacity_note;
  char *inverse_heading;
  const char *inverse_caveat;
  HlReportAnswer *answers;   /* grouped by row, rows in order */
  size_t n_answers;

  /* Page two. */
  int figure_option;         /* -1 native, or an option index */
  char *figure_heading;
  char *charts_heading;
  bool have_mc;
  HlMcSettings mc;
  bool m_assumed;
  HlMcSummary *mc_summary;   /* n_cases, NULL without the Monte Carlo */
  HlMcInfo mc_info;
  HlChartData *charts[HL_CHART_N];
  char *assumptions_heading;
  HlReportLines assumptions;
  char *sources_heading;
  HlReportLines sources;

  /* Every page. */
  const char *footer_caution;
  char *footer_version;
  char *continued;           /* the running head of a continuation page */

  double compute_s;          /* seconds the core took (for benchmarks) */
} HlReportData;

/* Runs the core for the report.  NULL with err set when the plan cannot
 * be solved, a setting is out of range, or memory runs out. */
HlReportData *hl_report_data_new (const HlPlan *plan, const HlReportSettings *settings,
                                  HlError *err);
void hl_report_data_free (HlReportData *data);

/* The report's four chart sweeps in one CSV table (the header of
 * HL_SWEEP_CSV_HEADER once; the param column tells them apart).  *out is
 * malloc'd and NUL-terminated. */
HlStatus hl_report_data_sweeps_csv (const HlReportData *data, char **out, size_t *size,
                                    HlError *err);

#ifdef __cplusplus
}
#endif

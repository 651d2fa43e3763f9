/* hl-result-fields.h: the one table of result quantities.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every output that lists the quantities of an HlResult takes them from
 * here, in this order: the window's results view (ui/hl-results.c), the
 * command line's text table and CSV (app/hiplever-cli.c), the report's
 * results table (render/hl-report.c), the planning summary's <result>
 * attributes (core/hl-plan-io.c).  Each field says in which outputs
 * it appears, its label and unit, the decimals shown to people, its CSV
 * column and decimals (a contract: 3, 4 for the lever ratio) and its
 * attribute in the planning summary's <result>.
 */
#pragma once

#include <stddef.h>

#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Where a field appears. */
typedef enum {
  HL_OUT_WINDOW  = 1u << 0,   /* the results view, and its CSV copy */
  HL_OUT_CSV     = 1u << 1,   /* the command line's CSV (solve, batch): a contract */
  HL_OUT_TEXT    = 1u << 2,   /* solve's text table */
  HL_OUT_REPORT  = 1u << 3,   /* the report's results table */
  HL_OUT_SUMMARY = 1u << 4,   /* an attribute of the planning summary's <result> */
} HlResultOutput;

/* How a field reads against native. */
typedef enum {
  HL_FIELD_PERCENT,   /* a value and its change against native in per cent */
  HL_FIELD_VALUE,     /* an angle or a ratio: the value only */
  HL_FIELD_CHANGE,    /* already a change against native: signed */
} HlFieldKind;

typedef struct {
  const char *key;          /* stable id: "abductor-moment-arm" */
  const char *label;        /* N_(): with its unit, "Abductor moment arm (mm)" */
  const char *name;         /* N_(): without, for a table with a unit column */
  const char *unit;         /* N_(): "mm", "× BW", "" */
  int decimals;             /* shown to people (HL_DECIMALS_*) */
  const char *csv;          /* CSV column, NULL when not in the CSV */
  int csv_decimals;
  const char *xml;          /* attribute of the summary's <result> */
  int summary_order;        /* its place there (1, 2, ...; a contract), 0 when absent */
  HlFieldKind kind;
  unsigned outputs;         /* HlResultOutput bits */
  double (*get) (const HlResult *res);
} HlResultField;

#define HL_RESULT_FIELD_MAX 24

/* Every field, in display order; *n gets the count. */
const HlResultField *hl_result_fields (size_t *n);

/* The fields of one output, in order, into out[HL_RESULT_FIELD_MAX];
 * returns how many. */
size_t hl_result_fields_for (HlResultOutput output,
                             const HlResultField *out[HL_RESULT_FIELD_MAX]);

/* The summary's fields in the order of its <result> attributes. */
size_t hl_result_fields_summary (const HlResultField *out[HL_RESULT_FIELD_MAX]);

#ifdef __cplusplus
}
#endif

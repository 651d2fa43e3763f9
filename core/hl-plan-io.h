/* hl-plan-io.h: plan files and planning summaries (XML, libxml2).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The only core module that knows XML.  Files use our own namespace
 * HL_PLAN_NAMESPACE and carry a format version; a file whose version is
 * newer than HL_PLAN_FORMAT_VERSION is refused with HL_ERR_VERSION.
 *
 * Reading is safe: no DTD loading, no entity expansion, no network, a size
 * cap (HL_PLAN_MAX_BYTES); every file is validated against the XSD schema
 * (compiled in) before it is read, and errors give the line and the element.  Numbers are
 * written and read in the C locale whatever the process locale is.
 *
 * Writing is atomic: a temporary file in the same folder is written,
 * flushed and renamed over the target; a failed save leaves the old file as
 * it was.
 */
#pragma once

#include "hl-file-write.h"
#include "hl-plan.h"
#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_PLAN_NAMESPACE "urn:hiplever:plan"
#define HL_PLAN_FORMAT_VERSION 1
#define HL_PLAN_MAX_BYTES (8u * 1024u * 1024u)
#define HL_PLAN_FILE_EXTENSION ".hlplan"

/* The XSD schema (data/hiplever-plan.xsd), compiled into the library so
 * that validation never depends on finding a file. */
const char *hl_plan_schema_text (void);

/* Loads a plan (or a planning summary: its plan part) from a file or a
 * buffer.  On failure *out is untouched and err says why and where. */
HlStatus hl_plan_load_file (const char *path, HlPlan **out, HlError *err);
HlStatus hl_plan_load_buffer (const char *data, size_t size,
                              const char *name_for_errors, HlPlan **out,
                              HlError *err);

/* Serialises a plan; *out is malloc'd, NUL-terminated; caller frees. */
HlStatus hl_plan_to_buffer (const HlPlan *plan, char **out, size_t *size,
                            HlError *err);
/* Atomic save. */
HlStatus hl_plan_save_file (const HlPlan *plan, const char *path,
                            HlError *err);
/* Atomic save that first keeps the file being replaced as
 * path HL_PLAN_BACKUP_SUFFIX (see hl_write_file_atomic_backup). */
HlStatus hl_plan_save_file_backup (const HlPlan *plan, const char *path,
                                   HlError *err);

/* The planning summary: the plan plus results for native and every option,
 * their flags, the caution text and provenance (program version, model
 * version, date in ISO 8601, SHA-256 of the serialised plan).  `date_iso`
 * may be NULL for the current UTC time.  Every plan that loads has one: a
 * row that cannot be solved gets a <refusal> (its message, field and
 * landmark) instead of numbers, a plan whose landmarks allow no solve one
 * <refusal kind="plan">, and the uncertainty ranges, computed over native
 * and the options that solved, a <refusal kind="uncertainty"> when they
 * could not be. */
HlStatus hl_summary_to_buffer (const HlPlan *plan, const char *date_iso,
                               char **out, size_t *size, HlError *err);
HlStatus hl_summary_save_file (const HlPlan *plan, const char *path,
                               HlError *err);
/* The same for the command line (`summary`, `solve --format xml`): a plan
 * whose summary would carry a refusal is refused with the first one,
 * worded as hl_plan_solve_all() words it, and nothing is written. */
HlStatus hl_summary_to_buffer_solved (const HlPlan *plan, const char *date_iso,
                                      char **out, size_t *size, HlError *err);
HlStatus hl_summary_save_file_solved (const HlPlan *plan, const char *path,
                                      HlError *err);

#ifdef __cplusplus
}
#endif

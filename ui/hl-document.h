/* hl-document.h: the plan a window shows, with its history and results.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * HlDocument owns the HlPlan, the undo history (hl-undo.h), the file the
 * plan belongs to and whether it is saved, the option selected, and what
 * the core computes from the plan:
 *
 *  - the results: the model prepared ONCE per edit (hl_model_prepare) and
 *    native and every option solved once with it.  Every view reads these
 *    (results table, schematic, analysis page); none prepares or solves
 *    again for the same state;
 *  - the analysis: the Monte Carlo 5-95% ranges of the plan's uncertainty
 *    settings.  They run off the main thread (a GTask on a copy of the
 *    plan); an edit while one runs cancels it and the latest plan runs
 *    when it ends, so at most one runs and an edit never waits on one.
 *    A run is kept only if the plan has not changed since it started.
 *
 * Every edit goes through the document:
 *
 *     plan = hl_document_begin_edit (doc, field);   one undo step
 *     if (plan == NULL) return;                     out of memory, said
 *     plan->mass_kg = v;
 *     hl_document_end_edit (doc, HL_DOCUMENT_CHANGED_VALUES);
 *
 * and a landmark drag is hl_document_begin_drag, any number of
 * hl_document_move_landmark and hl_document_end_drag: one undo step.
 * Each ends in one emission of "changed" (HlDocumentChange flags) after the
 * results have been recomputed; views connect to it with
 * g_signal_connect_object and redraw what the flags name.
 *
 * Signals:
 *  - "changed" (guint flags): what changed, HlDocumentChange.
 *  - "error" (const char *primary, const char *secondary): an edit could
 *    not be made (out of memory); the window shows it.
 */
#pragma once

#include <gio/gio.h>
#include "hl-plan.h"
#include "hl-uncertainty.h"
#include "hl-ui-types.h"

G_BEGIN_DECLS

typedef enum {
  HL_DOCUMENT_CHANGED_GEOMETRY  = 1 << 0,  /* landmarks placed, moved, removed */
  HL_DOCUMENT_CHANGED_VALUES    = 1 << 1,  /* any other value of the plan */
  HL_DOCUMENT_CHANGED_OPTIONS   = 1 << 2,  /* options added, removed, renamed */
  HL_DOCUMENT_CHANGED_SELECTION = 1 << 3,  /* the selected option */
  HL_DOCUMENT_CHANGED_RESULTS   = 1 << 4,  /* hl_document_get_solved */
  HL_DOCUMENT_CHANGED_ANALYSIS  = 1 << 5,  /* hl_document_get_ranges */
  HL_DOCUMENT_CHANGED_FILE      = 1 << 6,  /* the file, saved or not */
  HL_DOCUMENT_CHANGED_HISTORY   = 1 << 7,  /* undo, redo: every control resyncs */
  HL_DOCUMENT_CHANGED_REPLACED  = 1 << 8,  /* a whole new plan: views refit */
} HlDocumentChange;

/* Anything of the plan itself. */
#define HL_DOCUMENT_CHANGED_PLAN \
  (HL_DOCUMENT_CHANGED_GEOMETRY | HL_DOCUMENT_CHANGED_VALUES | HL_DOCUMENT_CHANGED_OPTIONS)

#define HL_TYPE_DOCUMENT (hl_document_get_type ())
G_DECLARE_FINAL_TYPE (HlDocument, hl_document, HL, DOCUMENT, GObject)

HlDocument   *hl_document_new               (void);

/* ---- the plan and its file ---- */
const HlPlan *hl_document_get_plan          (HlDocument *self);
/* A whole new plan (opened, recovered, the demo): the history goes. */
gboolean      hl_document_replace           (HlDocument *self, const HlPlan *plan,
                                             GFile *file);
GFile        *hl_document_get_file          (HlDocument *self);
/* TRUE, with err saying why, when `path` is the same file (device and
 * inode, also through a link) as an input of the plan: its radiograph,
 * or, unless `own_file_ok` (saving the plan itself), the plan's own file.
 * Exports and Save As refuse such a path, so that no input is destroyed. */
gboolean      hl_document_output_is_input   (HlDocument *self, const char *path,
                                             gboolean own_file_ok, HlError *err);
/* The plan was written to `file`: it is now the saved state. */
void          hl_document_set_saved         (HlDocument *self, GFile *file);
gboolean      hl_document_is_modified       (HlDocument *self);
/* No state of this plan is saved (a recovered plan). */
void          hl_document_mark_unsaved      (HlDocument *self);
/* Of the current state; equal revisions mean equal plans. */
guint64       hl_document_get_revision      (HlDocument *self);

/* ---- edits ---- */
/* Records the plan as one undo step (`field` non-NULL coalesces repeated
 * edits of one control) and returns it to change; NULL when out of memory
 * ("error" emitted, nothing changed). */
HlPlan       *hl_document_begin_edit        (HlDocument *self, const char *field);
/* Recomputes the results and emits "changed" with `what`. */
void          hl_document_end_edit          (HlDocument *self, HlDocumentChange what);
/* Ends coalescing: the next edit is a new undo step whatever its field. */
void          hl_document_break_coalescing  (HlDocument *self);

void          hl_document_begin_drag        (HlDocument *self);
void          hl_document_move_landmark     (HlDocument *self, HlLandmarkId id,
                                             double x_mm, double y_mm);
/* Cancelled: the landmark is already back; the undo step is dropped. */
void          hl_document_end_drag          (HlDocument *self, gboolean cancelled);
gboolean      hl_document_is_dragging       (HlDocument *self);
/* Any other edit made by dragging (an implant template): between
 * hl_document_begin_drag and hl_document_end_drag, the plan to change
 * (NULL when no drag is on) and, after changing it, the recomputation and
 * "changed" with `what`; the whole drag stays one undo step. */
HlPlan       *hl_document_drag_plan         (HlDocument *self);
void          hl_document_drag_changed      (HlDocument *self, HlDocumentChange what);

gboolean      hl_document_can_undo          (HlDocument *self);
gboolean      hl_document_can_redo          (HlDocument *self);
gboolean      hl_document_undo              (HlDocument *self);
gboolean      hl_document_redo              (HlDocument *self);

/* ---- selection ---- */
/* -1 (or any index out of range): native. */
void          hl_document_select_option     (HlDocument *self, int index);
int           hl_document_get_selected_option (HlDocument *self);

/* ---- results ---- */
/* 1 + plan->n_options columns, native first; valid until the next edit. */
const HlSolved *hl_document_get_solved      (HlDocument *self, size_t *n);
/* The prepared model, NULL (and why in *err) when the plan cannot be
 * prepared. */
const HlModel *hl_document_get_model        (HlDocument *self, HlError *err);
/* How often the model has been prepared: once per edit.  For tests and
 * the benchmark. */
guint          hl_document_get_prepare_count (HlDocument *self);

/* ---- analysis ---- */
/* The 5-95% ranges (n columns, native first) and the note that says from
 * what; NULL ranges with a note (may be NULL) saying why there are none.
 * While the run for the current state is on, the last ranges, with
 * *pending TRUE: a view shows them until the new ones come. */
const HlMcSummary *hl_document_get_ranges   (HlDocument *self, size_t *n,
                                             const char **note, gboolean *pending);
/* TRUE while a background computation for an earlier state runs: tests
 * wait for it. */
gboolean       hl_document_get_busy         (HlDocument *self);

/* An error in plain words with its line and field, for messages. */
char          *hl_document_format_error     (const HlError *err);

G_END_DECLS

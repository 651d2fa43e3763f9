/* hl-document.c: the plan, its history, its results and its analysis.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#define G_LOG_DOMAIN "hl-document"

#include <inttypes.h>
#include <string.h>
#include <glib/gi18n.h>

#include "hl-document.h"
#include "hl-file-write.h"
#include "hl-undo.h"
#include "hl-worker.h"

struct _HlDocument {
  GObject parent_instance;

  /* owned */
  HlPlan *plan;
  HlUndo *undo;
  GFile *file;               /* NULL: never saved under a name */
  HlModel model;
  HlStatus model_status;
  HlError model_error;
  HlSolved *solved;          /* 1 + plan->n_options columns */
  size_t solved_capacity;
  HlMcWorkspace *ws;         /* lent to the one running range task */
  size_t ws_samples;
  size_t ws_options;
  HlMcSummary *ranges;       /* n_ranges columns, NULL: none */
  size_t n_ranges;
  char *ranges_note;
  GCancellable *ranges_cancel;

  /* state */
  guint64 revision;          /* of the current state of the plan */
  guint64 saved_revision;
  guint64 next_revision;
  guint64 ranges_revision;   /* the state the ranges are of */
  int selected_option;       /* -1: native */
  gboolean dragging;
  gboolean ranges_running;
  gboolean ranges_wanted;    /* a newer state waits for the running task */
  guint prepare_count;
};

G_DEFINE_FINAL_TYPE (HlDocument, hl_document, G_TYPE_OBJECT)

enum {
  SIGNAL_CHANGED,
  SIGNAL_ERROR,
  N_SIGNALS
};

static guint signals[N_SIGNALS];

char *
hl_document_format_error (const HlError *err)
{
  const char *msg = err->message[0] != '\0' ? err->message
                                             : hl_status_name (err->status);

  /* File errors from the core already say where. */
  if (strstr (msg, "line ") != NULL || (err->field[0] != '\0' && strstr (msg, err->field) != NULL))
    return g_strdup (msg);
  if (err->line > 0 && err->field[0] != '\0')
    return g_strdup_printf (_("Line %d, %s: %s"), err->line, err->field, msg);
  if (err->line > 0)
    return g_strdup_printf (_("Line %d: %s"), err->line, msg);
  if (err->field[0] != '\0')
    return g_strdup_printf ("%s: %s", err->field, msg);
  return g_strdup (msg);
}

/* ---- the ranges, off the main thread -------------------------------- */

typedef struct {
  HlPlan *plan;              /* a copy: the main thread edits its own */
  guint64 revision;
  HlMcWorkspace *ws;         /* borrowed from the document */
  HlMcSettings mc;
  bool m_assumed;
  HlMcSummary *summary;
  HlMcInfo info;
  HlError err;
} HlRangesJob;

static void
ranges_job_free (gpointer data)
{
  HlRangesJob *job = data;

  hl_plan_free (job->plan);
  g_free (job->summary);
  g_free (job);
}

static void
ranges_thread_cb (GTask *task, gpointer source, gpointer data, GCancellable *cancel)
{
  HlRangesJob *job = data;
  HlModel model;

  hl_worker_lower_priority ();

  if (g_cancellable_is_cancelled (cancel))
    return;
  if (hl_model_prepare (&model, job->plan, &job->err) != HL_OK)
    return;
  hl_mc_run (job->ws, &model, job->plan->options, job->plan->n_options, &job->mc,
             job->summary, &job->info, &job->err);
}

static void start_ranges (HlDocument *self);

static void
set_ranges (HlDocument *self, HlMcSummary *ranges, size_t n, char *note)
{
  g_free (self->ranges);
  g_free (self->ranges_note);
  self->ranges = ranges;
  self->n_ranges = ranges != NULL ? n : 0;
  self->ranges_note = note;
  self->ranges_revision = self->revision;
}

static void
ranges_done_cb (GObject *source, GAsyncResult *result, gpointer user_data)
{
  HlDocument *self = HL_DOCUMENT (source);
  GTask *task = G_TASK (result);
  HlRangesJob *job = g_task_get_task_data (task);
  gboolean current = !g_cancellable_is_cancelled (g_task_get_cancellable (task))
                     && job->revision == self->revision;

  self->ranges_running = FALSE;
  g_clear_object (&self->ranges_cancel);
  if (current)
    {
      size_t n = 1 + job->plan->n_options;

      if (job->err.status != HL_OK)
        {
          g_autofree char *msg = hl_document_format_error (&job->err);

          set_ranges (self, NULL, 0, g_strdup_printf (_("No 5–95%% ranges: %s"), msg));
        }
      else
        set_ranges (self, g_steal_pointer (&job->summary), n,
                    g_strdup_printf (_("5–95%% ranges from %zu Monte Carlo samples (seed %" PRIu64 "): "
                                       "landmark placement error SD %.1f mm, magnification SD %.3f "
                                       "about %.3f%s, abductor line angle SD %.1f°.%s"),
                                     job->info.n_used, job->info.seed, job->mc.landmark_sd_mm,
                                     job->mc.magnification_sd, job->mc.magnification,
                                     job->m_assumed ? _(" (assumed: no usable calibration)") : "",
                                     job->mc.line_angle_sd_deg,
                                     job->info.n_dropped > 0
                                     ? _(" Samples that could not be solved were left out.") : ""));
      g_signal_emit (self, signals[SIGNAL_CHANGED], 0, (guint) HL_DOCUMENT_CHANGED_ANALYSIS);
    }
  if (self->ranges_wanted)
    start_ranges (self);
}

static gboolean
ensure_workspace (HlDocument *self, size_t samples, size_t options)
{
  options = MAX (options, 1);
  if (self->ws != NULL && samples <= self->ws_samples && options <= self->ws_options)
    return TRUE;
  g_clear_pointer (&self->ws, hl_mc_workspace_free);
  self->ws = hl_mc_workspace_new (samples, options);
  self->ws_samples = self->ws != NULL ? samples : 0;
  self->ws_options = self->ws != NULL ? options : 0;
  return self->ws != NULL;
}

/* Runs the Monte Carlo of the current state in a worker thread; with one
 * running, cancels it and runs again when it has finished. */
static void
start_ranges (HlDocument *self)
{
  g_autoptr(GTask) task = NULL;
  HlRangesJob *job;

  if (self->ranges_running)
    {
      g_cancellable_cancel (self->ranges_cancel);
      self->ranges_wanted = TRUE;
      return;
    }
  self->ranges_wanted = FALSE;
  /* A plan that cannot be solved: the table already says why. */
  if (self->solved[0].status != HL_OK)
    {
      set_ranges (self, NULL, 0, NULL);
      return;
    }
  job = g_new0 (HlRangesJob, 1);
  job->revision = self->revision;
  hl_mc_settings_for_plan (self->plan, &job->mc, &job->m_assumed);
  job->plan = hl_plan_copy (self->plan);
  job->summary = g_new0 (HlMcSummary, 1 + self->plan->n_options);
  if (job->plan == NULL || !ensure_workspace (self, job->mc.n_samples, self->plan->n_options))
    {
      ranges_job_free (job);
      set_ranges (self, NULL, 0,
                  g_strdup_printf (_("No 5–95%% ranges: %s"),
                                   _("there is not enough memory for the Monte Carlo samples")));
      return;
    }
  job->ws = self->ws;
  self->ranges_cancel = g_cancellable_new ();
  self->ranges_running = TRUE;
  task = g_task_new (self, self->ranges_cancel, ranges_done_cb, NULL);
  g_task_set_source_tag (task, start_ranges);
  g_task_set_task_data (task, job, ranges_job_free);
  g_task_set_check_cancellable (task, FALSE);
  g_task_run_in_thread (task, ranges_thread_cb);
}

/* ---- results -------------------------------------------------------- */

/* Prepares the model once and solves native and every option with it. */
static void
solve (HlDocument *self)
{
  size_t n = 1 + self->plan->n_options;

  if (n > self->solved_capacity)
    {
      self->solved = g_renew (HlSolved, self->solved, n);
      self->solved_capacity = n;
    }
  hl_error_clear (&self->model_error);
  self->model_status = hl_model_prepare (&self->model, self->plan, &self->model_error);
  self->prepare_count++;
  for (size_t i = 0; i < n; i++)
    {
      HlSolved *s = &self->solved[i];

      memset (&s->result, 0, sizeof s->result);
      hl_error_clear (&s->error);
      if (self->model_status != HL_OK)
        {
          s->status = self->model_status;
          s->error = self->model_error;
          continue;
        }
      s->status = hl_model_solve_row (&self->model, self->plan, i, &s->result,
                                      &s->error);
    }
}

static void
changed (HlDocument *self, HlDocumentChange what)
{
  if (what & HL_DOCUMENT_CHANGED_PLAN)
    {
      solve (self);
      start_ranges (self);
      what |= HL_DOCUMENT_CHANGED_RESULTS | HL_DOCUMENT_CHANGED_FILE;
    }
  if (self->selected_option >= (int) self->plan->n_options)
    {
      self->selected_option = (int) self->plan->n_options - 1;
      what |= HL_DOCUMENT_CHANGED_SELECTION;
    }
  g_signal_emit (self, signals[SIGNAL_CHANGED], 0, (guint) what);
}

/* ---- public --------------------------------------------------------- */

HlDocument *
hl_document_new (void)
{
  return g_object_new (HL_TYPE_DOCUMENT, NULL);
}

const HlPlan *
hl_document_get_plan (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  return self->plan;
}

gboolean
hl_document_replace (HlDocument *self, const HlPlan *plan, GFile *file)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  if (hl_plan_assign (self->plan, plan) != HL_OK)
    {
      g_signal_emit (self, signals[SIGNAL_ERROR], 0, _("Out of memory"),
                     _("The plan could not be taken over."));
      return FALSE;
    }
  g_set_object (&self->file, file);
  hl_undo_clear (self->undo);
  self->dragging = FALSE;
  self->revision = ++self->next_revision;
  self->saved_revision = self->revision;
  self->selected_option = self->plan->n_options > 0 ? 0 : -1;
  changed (self, HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_SELECTION
                 | HL_DOCUMENT_CHANGED_HISTORY | HL_DOCUMENT_CHANGED_REPLACED);
  return TRUE;
}

GFile *
hl_document_get_file (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  return self->file;
}

gboolean
hl_document_output_is_input (HlDocument *self, const char *path, gboolean own_file_ok,
                             HlError *err)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  if (path == NULL)
    return FALSE;
  if (self->plan->radiograph.present && hl_file_same (path, self->plan->radiograph.path))
    {
      hl_error_set (err, HL_ERR_IO, "file",
                    _("This file is the plan's radiograph; choose another name so that "
                      "the image is not overwritten."));
      return TRUE;
    }
  if (!own_file_ok && self->file != NULL)
    {
      g_autofree char *own = g_file_get_path (self->file);
      if (own != NULL && hl_file_same (path, own))
        {
          hl_error_set (err, HL_ERR_IO, "file",
                        _("This file is the plan itself; choose another name so that the "
                          "plan file is not overwritten."));
          return TRUE;
        }
    }
  return FALSE;
}

void
hl_document_set_saved (HlDocument *self, GFile *file)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  g_set_object (&self->file, file);
  self->saved_revision = self->revision;
  changed (self, HL_DOCUMENT_CHANGED_FILE);
}

gboolean
hl_document_is_modified (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return self->revision != self->saved_revision;
}

void
hl_document_mark_unsaved (HlDocument *self)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  /* Revision 0 is never a state of the plan: hl_document_replace bumps. */
  self->saved_revision = 0;
  changed (self, HL_DOCUMENT_CHANGED_FILE);
}

guint64
hl_document_get_revision (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), 0);
  return self->revision;
}

HlPlan *
hl_document_begin_edit (HlDocument *self, const char *field)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  if (!hl_undo_record (self->undo, self->plan, self->revision, field))
    {
      g_signal_emit (self, signals[SIGNAL_ERROR], 0, _("Out of memory"),
                     _("The edit was not made because the undo step could not be recorded."));
      return NULL;
    }
  self->revision = ++self->next_revision;
  return self->plan;
}

void
hl_document_end_edit (HlDocument *self, HlDocumentChange what)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  changed (self, what | HL_DOCUMENT_CHANGED_HISTORY);
}

void
hl_document_break_coalescing (HlDocument *self)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  hl_undo_break (self->undo);
}

void
hl_document_begin_drag (HlDocument *self)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  hl_undo_break (self->undo);
  if (hl_document_begin_edit (self, NULL) != NULL)
    self->dragging = TRUE;
}

void
hl_document_move_landmark (HlDocument *self, HlLandmarkId id, double x_mm, double y_mm)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  if ((int) id < 0 || id >= HL_LM_COUNT)
    return;
  /* A move without a begin (should not happen) is still one undo step. */
  if (!self->dragging && hl_document_begin_edit (self, NULL) == NULL)
    return;
  hl_landmarks_set (&self->plan->landmarks, id, x_mm, y_mm);
  changed (self, HL_DOCUMENT_CHANGED_GEOMETRY
                 | (self->dragging ? 0 : HL_DOCUMENT_CHANGED_HISTORY));
}

void
hl_document_end_drag (HlDocument *self, gboolean cancelled)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  self->dragging = FALSE;
  hl_undo_break (self->undo);
  if (cancelled)
    {
      guint64 revision;

      if (hl_undo_drop_last (self->undo, &revision))
        self->revision = revision;
      changed (self, HL_DOCUMENT_CHANGED_GEOMETRY | HL_DOCUMENT_CHANGED_HISTORY);
    }
  else
    changed (self, HL_DOCUMENT_CHANGED_HISTORY);
}

HlPlan *
hl_document_drag_plan (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  return self->dragging ? self->plan : NULL;
}

void
hl_document_drag_changed (HlDocument *self, HlDocumentChange what)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  changed (self, what);
}

gboolean
hl_document_is_dragging (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return self->dragging;
}

gboolean
hl_document_can_undo (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return hl_undo_can_undo (self->undo);
}

gboolean
hl_document_can_redo (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return hl_undo_can_redo (self->undo);
}

static gboolean
after_history_step (HlDocument *self)
{
  changed (self, HL_DOCUMENT_CHANGED_PLAN | HL_DOCUMENT_CHANGED_HISTORY
                 | HL_DOCUMENT_CHANGED_SELECTION);
  return TRUE;
}

gboolean
hl_document_undo (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return hl_undo_undo (self->undo, self->plan, &self->revision)
         && after_history_step (self);
}

gboolean
hl_document_redo (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return hl_undo_redo (self->undo, self->plan, &self->revision)
         && after_history_step (self);
}

void
hl_document_select_option (HlDocument *self, int index)
{
  g_return_if_fail (HL_IS_DOCUMENT (self));
  if (index < 0 || (size_t) index >= self->plan->n_options)
    index = -1;
  self->selected_option = index;
  /* Emitted even when unchanged: the lists that asked follow again. */
  changed (self, HL_DOCUMENT_CHANGED_SELECTION);
}

int
hl_document_get_selected_option (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), -1);
  return self->selected_option;
}

const HlSolved *
hl_document_get_solved (HlDocument *self, size_t *n)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  if (n != NULL)
    *n = 1 + self->plan->n_options;
  return self->solved;
}

const HlModel *
hl_document_get_model (HlDocument *self, HlError *err)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  if (self->model_status != HL_OK)
    {
      if (err != NULL)
        *err = self->model_error;
      return NULL;
    }
  return &self->model;
}

guint
hl_document_get_prepare_count (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), 0);
  return self->prepare_count;
}

const HlMcSummary *
hl_document_get_ranges (HlDocument *self, size_t *n, const char **note, gboolean *pending)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), NULL);
  if (pending != NULL)
    *pending = self->ranges_revision != self->revision;
  if (note != NULL)
    *note = self->ranges_note;
  if (n != NULL)
    *n = self->n_ranges;
  return self->ranges;
}

gboolean
hl_document_get_busy (HlDocument *self)
{
  g_return_val_if_fail (HL_IS_DOCUMENT (self), FALSE);
  return self->ranges_running;
}

/* ---- GObject -------------------------------------------------------- */

static void
hl_document_dispose (GObject *object)
{
  HlDocument *self = HL_DOCUMENT (object);

  if (self->ranges_cancel != NULL)
    g_cancellable_cancel (self->ranges_cancel);
  self->ranges_wanted = FALSE;
  G_OBJECT_CLASS (hl_document_parent_class)->dispose (object);
}

static void
hl_document_finalize (GObject *object)
{
  HlDocument *self = HL_DOCUMENT (object);

  g_clear_pointer (&self->undo, hl_undo_free);
  g_clear_pointer (&self->plan, hl_plan_free);
  g_clear_pointer (&self->solved, g_free);
  g_clear_pointer (&self->ws, hl_mc_workspace_free);
  g_clear_pointer (&self->ranges, g_free);
  g_clear_pointer (&self->ranges_note, g_free);
  g_clear_object (&self->ranges_cancel);
  g_clear_object (&self->file);
  G_OBJECT_CLASS (hl_document_parent_class)->finalize (object);
}

static void
hl_document_class_init (HlDocumentClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);

  object_class->dispose = hl_document_dispose;
  object_class->finalize = hl_document_finalize;

  signals[SIGNAL_CHANGED] = g_signal_new ("changed", G_TYPE_FROM_CLASS (klass),
                                          G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                          G_TYPE_NONE, 1, G_TYPE_UINT);
  signals[SIGNAL_ERROR] = g_signal_new ("error", G_TYPE_FROM_CLASS (klass),
                                        G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                        G_TYPE_NONE, 2, G_TYPE_STRING, G_TYPE_STRING);
}

static void
hl_document_init (HlDocument *self)
{
  self->plan = hl_plan_new ();
  self->undo = hl_undo_new (HL_UNDO_DEFAULT_LIMIT);
  if (self->plan == NULL || self->undo == NULL)
    g_error ("out of memory creating the plan");
  self->selected_option = -1;
  self->solved_capacity = 1;
  self->solved = g_new0 (HlSolved, self->solved_capacity);
  self->revision = self->saved_revision = self->next_revision = 0;
  self->ranges_revision = G_MAXUINT64;
  solve (self);
  start_ranges (self);
}

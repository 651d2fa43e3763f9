/* hl-undo.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-undo.h"

typedef struct {
  HlPlan *plan;
  guint64 revision;
} HlSnapshot;

struct _HlUndo {
  GQueue undo;     /* of HlSnapshot*, newest at the head */
  GQueue redo;
  guint limit;
  char *last_field;
};

static void
hl_snapshot_free (gpointer data)
{
  HlSnapshot *snap = data;

  if (snap == NULL)
    return;
  hl_plan_free (snap->plan);
  g_free (snap);
}

static HlSnapshot *
hl_snapshot_new (const HlPlan *plan, guint64 revision)
{
  HlPlan *copy = hl_plan_copy (plan);
  HlSnapshot *snap;

  if (copy == NULL)
    return NULL;
  snap = g_new0 (HlSnapshot, 1);
  snap->plan = copy;
  snap->revision = revision;
  return snap;
}

HlUndo *
hl_undo_new (guint limit)
{
  HlUndo *self = g_new0 (HlUndo, 1);

  g_queue_init (&self->undo);
  g_queue_init (&self->redo);
  self->limit = limit > 0 ? limit : HL_UNDO_DEFAULT_LIMIT;
  return self;
}

static void
hl_undo_clear_queue (GQueue *queue)
{
  HlSnapshot *snap;

  while ((snap = g_queue_pop_head (queue)) != NULL)
    hl_snapshot_free (snap);
}

void
hl_undo_clear (HlUndo *self)
{
  g_return_if_fail (self != NULL);

  hl_undo_clear_queue (&self->undo);
  hl_undo_clear_queue (&self->redo);
  g_clear_pointer (&self->last_field, g_free);
}

void
hl_undo_free (HlUndo *self)
{
  if (self == NULL)
    return;
  hl_undo_clear (self);
  g_free (self);
}

void
hl_undo_break (HlUndo *self)
{
  g_return_if_fail (self != NULL);

  g_clear_pointer (&self->last_field, g_free);
}

gboolean
hl_undo_record (HlUndo *self, const HlPlan *before, guint64 before_revision,
                const char *field)
{
  HlSnapshot *snap;

  g_return_val_if_fail (self != NULL, FALSE);
  g_return_val_if_fail (before != NULL, FALSE);

  if (field != NULL && self->last_field != NULL
      && g_str_equal (field, self->last_field)
      && !g_queue_is_empty (&self->undo))
    return TRUE;

  snap = hl_snapshot_new (before, before_revision);
  if (snap == NULL)
    return FALSE;

  hl_undo_clear_queue (&self->redo);
  g_queue_push_head (&self->undo, snap);
  while (g_queue_get_length (&self->undo) > self->limit)
    hl_snapshot_free (g_queue_pop_tail (&self->undo));

  g_free (self->last_field);
  self->last_field = g_strdup (field);
  return TRUE;
}

gboolean
hl_undo_drop_last (HlUndo *self, guint64 *revision)
{
  HlSnapshot *snap;

  g_return_val_if_fail (self != NULL, FALSE);

  snap = g_queue_pop_head (&self->undo);
  if (snap == NULL)
    return FALSE;
  if (revision != NULL)
    *revision = snap->revision;
  hl_snapshot_free (snap);
  hl_undo_break (self);
  return TRUE;
}

gboolean
hl_undo_can_undo (const HlUndo *self)
{
  g_return_val_if_fail (self != NULL, FALSE);
  return self->undo.length > 0;
}

gboolean
hl_undo_can_redo (const HlUndo *self)
{
  g_return_val_if_fail (self != NULL, FALSE);
  return self->redo.length > 0;
}

guint
hl_undo_n_undo (const HlUndo *self)
{
  g_return_val_if_fail (self != NULL, 0);
  return self->undo.length;
}

/* Moves the head of `from` into `current` and `current` onto `to`. */
static gboolean
hl_undo_step (HlUndo *self, GQueue *from, GQueue *to, HlPlan *current,
              guint64 *revision)
{
  HlSnapshot *target = g_queue_peek_head (from);
  HlSnapshot *back;

  if (target == NULL)
    return FALSE;
  back = hl_snapshot_new (current, *revision);
  if (back == NULL)
    return FALSE;
  if (hl_plan_assign (current, target->plan) != HL_OK)
    {
      hl_snapshot_free (back);
      return FALSE;
    }
  *revision = target->revision;
  hl_snapshot_free (g_queue_pop_head (from));
  g_queue_push_head (to, back);
  hl_undo_break (self);
  return TRUE;
}

gboolean
hl_undo_undo (HlUndo *self, HlPlan *current, guint64 *revision)
{
  g_return_val_if_fail (self != NULL && current != NULL && revision != NULL,
                        FALSE);
  return hl_undo_step (self, &self->undo, &self->redo, current, revision);
}

gboolean
hl_undo_redo (HlUndo *self, HlPlan *current, guint64 *revision)
{
  g_return_val_if_fail (self != NULL && current != NULL && revision != NULL,
                        FALSE);
  return hl_undo_step (self, &self->redo, &self->undo, current, revision);
}

/* hl-undo.h: undo and redo as a stack of whole-plan snapshots.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every edit records the plan as it was before the edit.  Each state of
 * the plan carries a revision number so that the window can tell whether
 * the current state is the one last saved, whichever way it got there.
 *
 * Coalescing: a record with a non-NULL `field` equal to the field of the
 * record just before it (with no undo, redo or other record in between) is
 * dropped, so a spin button that keeps changing is one step.
 */
#pragma once

#include <glib.h>
#include "hl-plan.h"

G_BEGIN_DECLS

typedef struct _HlUndo HlUndo;

/* Steps beyond this are forgotten, oldest first. */
#define HL_UNDO_DEFAULT_LIMIT 500

HlUndo  *hl_undo_new            (guint limit);
void     hl_undo_free           (HlUndo *self);
void     hl_undo_clear          (HlUndo *self);

/* Records `before` (with its revision) as one undo step and drops the redo
 * steps.  Returns FALSE when out of memory (nothing recorded). */
gboolean hl_undo_record         (HlUndo *self, const HlPlan *before,
                                 guint64 before_revision, const char *field);
/* Ends coalescing: the next record is a new step whatever its field. */
void     hl_undo_break          (HlUndo *self);
/* Forgets the last recorded step without applying it (a cancelled drag
 * that put everything back); its revision goes to *revision. */
gboolean hl_undo_drop_last      (HlUndo *self, guint64 *revision);

gboolean hl_undo_can_undo       (const HlUndo *self);
gboolean hl_undo_can_redo       (const HlUndo *self);
guint    hl_undo_n_undo         (const HlUndo *self);

/* Replaces `current` with the previous (next) snapshot and keeps `current`
 * for the way back; *revision is the current revision in and out.  FALSE
 * when there is nothing to undo (redo) or out of memory (nothing changed). */
gboolean hl_undo_undo           (HlUndo *self, HlPlan *current,
                                 guint64 *revision);
gboolean hl_undo_redo           (HlUndo *self, HlPlan *current,
                                 guint64 *revision);

G_DEFINE_AUTOPTR_CLEANUP_FUNC (HlUndo, hl_undo_free)

G_END_DECLS

/* hl-scene.h: what a drawing shows of one plan and one option, computed.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The core prepares the model, solves the row, works out the forces to
 * draw, the option's moved landmarks and its implant outline; render/
 * draws the scene (hl-render.h) and computes none of it.
 */
#pragma once

#include <stdbool.h>
#include "hl-plan.h"
#include "hl-solve.h"
#include "hl-template-shape.h"
#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Everything the drawing needs from one plan and one option, solved once.
 * Build it after each edit of the plan and draw it as often as needed. */
typedef struct {
  const HlPlan *plan;        /* borrowed */
  int option_index;          /* -1 = native; an index out of range = native */
  bool has_option;

  HlLandmarks native;        /* the plan's landmarks */
  HlLandmarks shown;         /* the option's (= native without an option) */

  bool prepared;             /* hl_model_prepare succeeded */
  bool solved;               /* the result and forces are valid */
  HlError error;             /* why not, when !solved */
  HlModel model;
  HlResult result;
  HlForceSet forces;
  /* The option's implant template (hl-template-shape.h), drawn by
   * hl-render-template.c; has_template false for a manual option. */
  bool has_template;
  HlTemplateShape tmpl;
} HlScene;

/* Never fails: a plan that cannot be solved gives a scene with solved false
 * and the reason in scene->error. */
void hl_scene_build (HlScene *scene, const HlPlan *plan, int option_index);

/* The same from the model the caller prepared and what hl_model_solve
 * gave for this option (status, result, error), so a plan solved once is
 * not solved again for the drawing.  `model` NULL: it could not be
 * prepared, `error` says why. */
void hl_scene_build_solved (HlScene *scene, const HlPlan *plan, int option_index,
                            const HlModel *model, HlStatus status,
                            const HlResult *result, const HlError *error);

#ifdef __cplusplus
}
#endif

/* hl-scene.c: a drawing's scene, computed (hl-scene.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "hl-i18n.h"
#include "hl-scene.h"

static const HlRecon *
scene_recon (const HlScene *scene)
{
  if (!scene->has_option)
    return NULL;
  return &scene->plan->options[scene->option_index].recon;
}

static bool
scene_init (HlScene *scene, const HlPlan *plan, int option_index)
{
  memset (scene, 0, sizeof *scene);
  scene->plan = plan;
  scene->option_index = -1;
  if (plan == NULL)
    {
      hl_error_set (&scene->error, HL_ERR_INVALID, "plan", "%s",
                    _("There is no plan to draw."));
      return false;
    }
  scene->native = plan->landmarks;
  scene->shown = plan->landmarks;
  if (option_index >= 0 && (size_t) option_index < plan->n_options)
    {
      scene->has_option = true;
      scene->option_index = option_index;
      hl_recon_landmarks (plan, scene_recon (scene), &scene->shown);
      scene->has_template = plan->options[option_index].recon.tmpl.on;
      if (scene->has_template)
        hl_template_shape (plan, (size_t) option_index, NULL, &scene->tmpl);
    }
  return true;
}

void
hl_scene_build (HlScene *scene, const HlPlan *plan, int option_index)
{
  if (!scene_init (scene, plan, option_index))
    return;
  if (hl_model_prepare (&scene->model, plan, &scene->error) != HL_OK)
    return;
  scene->prepared = true;
  if (hl_model_solve (&scene->model, scene_recon (scene), &scene->result,
                      &scene->error) != HL_OK)
    return;
  hl_model_forces (&scene->model, plan, scene_recon (scene), &scene->result,
                   &scene->forces);
  scene->solved = true;
}

void
hl_scene_build_solved (HlScene *scene, const HlPlan *plan, int option_index,
                       const HlModel *model, HlStatus status,
                       const HlResult *result, const HlError *error)
{
  if (!scene_init (scene, plan, option_index))
    return;
  if (model == NULL || status != HL_OK)
    {
      if (error != NULL)
        scene->error = *error;
      if (model != NULL)
        {
          scene->model = *model;
          scene->prepared = true;
        }
      return;
    }
  scene->model = *model;
  scene->prepared = true;
  scene->result = *result;
  hl_model_forces (&scene->model, plan, scene_recon (scene), &scene->result,
                   &scene->forces);
  scene->solved = true;
}

/* hl-answer.c: the inverse answers of the analysis page and applying them.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "hl-answer.h"
#include "hl-i18n.h"

static const struct {
  const char *key;
  HlInverseKind kind;
  HlLoadSite site;
  bool needs_option;
} questions[HL_QUESTION_N] = {
  { "offset-for-arm", HL_INVERSE_OFFSET_FOR_ARM, HL_LOAD_SITE_N, true },
  { "offset-for-global", HL_INVERSE_OFFSET_FOR_GLOBAL, HL_LOAD_SITE_N, true },
  { "cane-for-jrf", HL_INVERSE_CANE_FOR_JRF, HL_LOAD_SITE_N, false },
  { "load-contralateral", HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_CONTRALATERAL, false },
  { "load-ipsilateral", HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_IPSILATERAL, false },
  { "load-midline", HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_MIDLINE, false },
  { "lean-for-capacity", HL_INVERSE_LEAN_FOR_CAPACITY, HL_LOAD_SITE_N, false },
};

static bool
valid (HlQuestion q)
{
  return (int) q >= 0 && q < HL_QUESTION_N;
}

const char *
hl_question_key (HlQuestion q)
{
  return valid (q) ? questions[q].key : "";
}

bool
hl_question_needs_option (HlQuestion q)
{
  return valid (q) && questions[q].needs_option;
}

HlInverseKind
hl_question_kind (HlQuestion q)
{
  return valid (q) ? questions[q].kind : HL_INVERSE_N;
}

HlLoadSite
hl_question_site (HlQuestion q)
{
  return valid (q) ? questions[q].site : HL_LOAD_SITE_N;
}

HlStatus
hl_question_ask (HlQuestion q, const HlModel *model, const HlPlan *plan, const HlRecon *recon,
                 double target_bw, HlInverseAnswer *a, HlError *err)
{
  if (!valid (q))
    return hl_error_set (err, HL_ERR_INVALID, "question", _("Unknown question %d"), (int) q);
  if (questions[q].needs_option && recon == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "question", "%s",
                         _("This question is about a reconstruction option: select one"));
  switch (questions[q].kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
      return hl_inverse_offset_for_arm (model, recon, NULL, a, err);
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      return hl_inverse_offset_for_global (model, recon, NULL, a, err);
    case HL_INVERSE_CANE_FOR_JRF:
      return hl_inverse_cane_for_jrf (model, recon, target_bw, plan->cane.distance_mm, NULL,
                                      a, err);
    case HL_INVERSE_LOAD_FOR_JRF:
      return hl_inverse_load_for_jrf (model, recon, questions[q].site, target_bw, NULL, a, err);
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      break;
    }
  return hl_inverse_lean_for_capacity (model, recon, NULL, a, err);
}

static double *
load_of (HlPlan *plan, HlLoadSite site)
{
  if (site == HL_LOAD_SITE_MIDLINE)
    return &plan->loads.midline_kg;
  return &plan->loads.hand[site == HL_LOAD_SITE_IPSILATERAL ? HL_HAND_IPSILATERAL
                                                             : HL_HAND_CONTRALATERAL].mass_kg;
}

static bool
same (double a, double b)
{
  return fabs (a - b) <= HL_ANSWER_SAME_TOL;
}

HlApplyState
hl_answer_apply_state (const HlPlan *plan, int option, HlQuestion q, const HlInverseAnswer *a)
{
  double v = a->value;

  if (!valid (q) || a->status != HL_OK || !isfinite (v) || a->kind != questions[q].kind)
    return HL_APPLY_NO_ANSWER;
  switch (questions[q].kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      /* A templated option's offset comes from its implants: choose them
       * (hl-fit.h) rather than type a number. */
      if (option < 0 || (size_t) option >= plan->n_options
          || plan->options[option].recon.tmpl.on)
        return HL_APPLY_NO_ANSWER;
      return same (plan->options[option].recon.femoral_offset_mm, v) ? HL_APPLY_ALREADY
                                                                       : HL_APPLY_CHANGES;
    case HL_INVERSE_CANE_FOR_JRF:
      if (v <= HL_ANSWER_SAME_TOL)
        return plan->cane.enabled ? HL_APPLY_CHANGES : HL_APPLY_ALREADY;
      return plan->cane.enabled && plan->cane.hand == HL_HAND_CONTRALATERAL
             && same (hl_plan_cane_force (plan), v) ? HL_APPLY_ALREADY : HL_APPLY_CHANGES;
    case HL_INVERSE_LOAD_FOR_JRF:
      if (a->at_limit)
        return HL_APPLY_WHOLE_RANGE;
      return same (*load_of ((HlPlan *) plan, questions[q].site), v) ? HL_APPLY_ALREADY
                                                                      : HL_APPLY_CHANGES;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      break;
    }
  return same (plan->model.lean_mm, v) ? HL_APPLY_ALREADY : HL_APPLY_CHANGES;
}

bool
hl_answer_apply (HlPlan *plan, int option, HlQuestion q, const HlInverseAnswer *a)
{
  double v = a->value;

  if (hl_answer_apply_state (plan, option, q, a) != HL_APPLY_CHANGES)
    return false;
  switch (questions[q].kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      plan->options[option].recon.femoral_offset_mm = v;
      break;
    case HL_INVERSE_CANE_FOR_JRF:
      plan->cane.enabled = v > HL_ANSWER_SAME_TOL;
      if (plan->cane.enabled)
        {
          plan->cane.hand = HL_HAND_CONTRALATERAL;
          plan->cane.value = hl_force_from_newtons (v, plan->cane.unit, plan->mass_kg);
        }
      break;
    case HL_INVERSE_LOAD_FOR_JRF:
      *load_of (plan, questions[q].site) = v;
      break;
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      plan->model.lean_mm = v;
      break;
    }
  return true;
}

/* hl-answer.h: the inverse answers of the window's analysis page, and what
 * applying one changes in the plan (no GTK).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each question is one of hl-inverse.h, asked for the selected option (or
 * native), and applying its answer puts the unknown into the plan so that
 * the forward solve meets the goal:
 *
 *  OFFSET_FOR_ARM, OFFSET_FOR_GLOBAL  the option's femoral_offset_mm;
 *  CANE_FOR_JRF     the cane, switched on, in the opposite hand at the
 *                   plan's distance, its force in the plan's cane unit (no
 *                   force at all switches the cane off);
 *  LOAD_*           that load of the plan, kg;
 *  LEAN_FOR_CAPACITY  the plan's lateral trunk lean, mm.
 *
 * The load questions answered "any load up to the end of the range" have
 * nothing to apply: the end of a search range is not a planning value.
 */
#pragma once

#include <stdbool.h>
#include "hl-inverse.h"
#include "hl-plan.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  HL_QUESTION_OFFSET_FOR_ARM = 0,
  HL_QUESTION_OFFSET_FOR_GLOBAL,
  HL_QUESTION_CANE_FOR_JRF,
  HL_QUESTION_LOAD_CONTRA,
  HL_QUESTION_LOAD_IPSI,
  HL_QUESTION_LOAD_MIDLINE,
  HL_QUESTION_LEAN_FOR_CAPACITY,
  HL_QUESTION_N
} HlQuestion;

/* An answer this close to the plan's value is already in the plan: the
 * root finder's own tolerance. */
#define HL_ANSWER_SAME_TOL HL_ROOT_EPSABS_DEFAULT

/* Stable names ("offset-for-arm", "load-contralateral" ...) for tests. */
const char *hl_question_key (HlQuestion question);
/* The two femoral offset questions need an option. */
bool hl_question_needs_option (HlQuestion question);
HlInverseKind hl_question_kind (HlQuestion question);
/* The load questions' site; HL_LOAD_SITE_N for the others. */
HlLoadSite hl_question_site (HlQuestion question);

/* Asks `question` of the prepared model of `plan` for `recon` (NULL:
 * native), the cane and load questions with the joint-load target in x
 * body weight.  Returns as the hl_inverse_* call: HL_OK,
 * HL_ERR_NOT_REACHABLE and HL_ERR_NOT_CONVERGED are answers in `answer`,
 * anything else a failure of the model with err saying why; a question
 * that needs an option gives HL_ERR_INVALID without one. */
HlStatus hl_question_ask (HlQuestion question, const HlModel *model, const HlPlan *plan,
                          const HlRecon *recon, double target_bw, HlInverseAnswer *answer,
                          HlError *err);

typedef enum {
  HL_APPLY_CHANGES = 0,   /* applying changes the plan */
  HL_APPLY_ALREADY,       /* the plan already holds the answer */
  HL_APPLY_NO_ANSWER,     /* not reachable, not converged, or no option */
  HL_APPLY_WHOLE_RANGE,   /* a load answer that is the end of the range */
} HlApplyState;

/* What applying `answer` of `question` to option `option` (-1 native;
 * used by the offset questions) of `plan` would do. */
HlApplyState hl_answer_apply_state (const HlPlan *plan, int option, HlQuestion question,
                                    const HlInverseAnswer *answer);
/* Applies it; false (plan unchanged) unless the state is HL_APPLY_CHANGES. */
bool hl_answer_apply (HlPlan *plan, int option, HlQuestion question,
                      const HlInverseAnswer *answer);

#ifdef __cplusplus
}
#endif
